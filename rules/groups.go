package rules

import (
	"fmt"
	"slices"
	"strings"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// SpecGroup is a programme group a spec declares ([[group]] in TOML):
// which channels (or audio streams, stream = 2 with channels counted
// within it) carry it and how to judge it.
type SpecGroup struct {
	measure.Group
	// Spec names the spec this group is judged against instead of the
	// file's (a built-in ID, or a spec file path relative to the spec file
	// that declares the group); empty means the file's spec.
	Spec string
	// MeasureOnly measures the group without judging it (an M&E or
	// clean-feed track that has no loudness requirement of its own).
	MeasureOnly bool
}

// RecordFields are the QC record's header fields a spec (or a config) may
// set ([record] in TOML): who ordered the check and who made it. Reports
// print them in the HTML header; command-line options override them.
type RecordFields struct {
	Job      string
	Client   string
	Operator string
	Notes    string
}

// Merge returns r with the fields of o that are set.
func (r RecordFields) Merge(o RecordFields) RecordFields {
	for _, f := range []struct{ dst, src *string }{{&r.Job, &o.Job}, {&r.Client, &o.Client}, {&r.Operator, &o.Operator}, {&r.Notes, &o.Notes}} {
		if *f.src != "" {
			*f.dst = *f.src
		}
	}
	return r
}

// MeasureGroups returns the spec's groups as the measurement takes them.
func (s *Spec) MeasureGroups() []measure.Group {
	var out []measure.Group
	for _, g := range s.Groups {
		out = append(out, g.Group)
	}
	return out
}

// group returns the spec's declaration of the named group, if any.
func (s *Spec) group(name string) (SpecGroup, bool) {
	for _, g := range s.Groups {
		if g.Name == name {
			return g, true
		}
	}
	return SpecGroup{}, false
}

// parseGroups reads the [[group]] tables of a spec file.
func (p *specParser) parseGroups(s *Spec, v any) {
	list, ok := v.([]map[string]any)
	if !ok {
		p.fail("group", "must be a list of tables: write [[group]] on a line of its own for each group, with name, channels and layout below it")
		return
	}
	s.Groups = nil
	for i, t := range list {
		at := fmt.Sprintf("group %d", i+1)
		var g SpecGroup
		for _, key := range sortedKeys(t) {
			val := t[key]
			str, isStr := val.(string)
			switch key {
			case "name":
				if !isStr || strings.TrimSpace(str) == "" {
					p.fail("group", "%s: name must be a non-empty string", at)
					continue
				}
				g.Name = str
			case "channels":
				chans, err := groupChannels(val)
				if err != nil {
					p.fail("group", "%s: %v", at, err)
					continue
				}
				g.Channels = chans
			case "stream", "streams":
				streams, err := groupStreams(val)
				if err != nil {
					p.fail("group", "%s: %v", at, err)
					continue
				}
				g.Streams = streams
			case "layout":
				if !isStr {
					p.fail("group", "%s: layout must be a string such as \"5.1\" or \"L,R\"", at)
					continue
				}
				l, err := decode.ParseLayout(str)
				if err != nil {
					p.fail("group", "%s: %v", at, err)
					continue
				}
				g.Layout = l
			case "spec":
				if !isStr || str == "" {
					p.fail("group", "%s: spec must be a built-in spec ID or a spec file path", at)
					continue
				}
				g.Spec = str
			case "measure_only":
				b, isBool := val.(bool)
				if !isBool {
					p.fail("group", "%s: measure_only must be true or false", at)
					continue
				}
				g.MeasureOnly = b
			default:
				p.fail("group", "%s: unknown key %q (known: name, stream, channels, layout, spec, measure_only)", at, key)
			}
		}
		switch {
		case g.Name == "":
			p.fail("group", "%s has no name", at)
			continue
		case g.Channels == nil && g.Streams == nil:
			p.fail("group", "group %q has no channels (e.g. channels = \"1-6\", or stream = 2)", g.Name)
			continue
		case slices.ContainsFunc(s.Groups, func(o SpecGroup) bool { return o.Name == g.Name }):
			p.fail("group", "group %q is declared twice", g.Name)
			continue
		}
		if err := g.Check(); err != nil {
			p.fail("group", "%v", err)
			continue
		}
		s.Groups = append(s.Groups, g)
	}
}

// groupStreams reads stream = 2, stream = "1-2" or streams = [3, 4].
func groupStreams(v any) ([]int, error) { return groupNumbers(v, "stream", measure.ParseStreams) }

// groupChannels reads channels = "1-6", channels = [7, 8] or channels = 3.
func groupChannels(v any) ([]int, error) { return groupNumbers(v, "channel", measure.ParseChannels) }

// groupNumbers reads a string list, a number or a list of numbers and
// strings of channels or streams with the given parser.
func groupNumbers(v any, what string, parse func(string) ([]int, error)) ([]int, error) {
	switch x := v.(type) {
	case string:
		return parse(x)
	case int64:
		return parse(fmt.Sprint(x))
	case []any:
		var parts []string
		for _, e := range x {
			switch n := e.(type) {
			case int64:
				parts = append(parts, fmt.Sprint(n))
			case string:
				parts = append(parts, n)
			default:
				return nil, fmt.Errorf("%ss: %v is not a %s number or range", what, e, what)
			}
		}
		return parse(strings.Join(parts, ","))
	}
	return nil, fmt.Errorf("%ss must be a number, a string like \"1-6\" or a list of numbers, got %s", what, describeValue(v))
}

// parseRecord reads the [record] table: job, client, operator, notes.
func (p *specParser) parseRecord(s *Spec, v any) {
	t, ok := v.(map[string]any)
	if !ok {
		p.fail("record", "must be a table: write [record] on a line of its own and job, client, operator, notes below it")
		return
	}
	for _, key := range sortedKeys(t) {
		str, isStr := t[key].(string)
		var dst *string
		switch key {
		case "job":
			dst = &s.Record.Job
		case "client":
			dst = &s.Record.Client
		case "operator":
			dst = &s.Record.Operator
		case "notes":
			dst = &s.Record.Notes
		default:
			p.fail("record."+key, "unknown key %q in [record] (known: job, client, operator, notes)", key)
			continue
		}
		if !isStr {
			p.fail("record."+key, "must be a string")
			continue
		}
		*dst = str
	}
}

// GroupResult is one programme group judged. Its JSON is the group's
// name and channel numbers, the group's measurement figures, and its spec,
// verdict and checks.
type GroupResult struct {
	Name        string `json:"name"`
	Channels    []int  `json:"channels"`
	Streams     []int  `json:"streams,omitempty"`
	MeasureOnly bool   `json:"measure_only,omitempty"`
	Result
}

// fileWideChecks are the checks about the file as a whole; with groups,
// they are judged once for the file and the others once per group.
var fileWideChecks = []string{"integrity", "container", "sample_rate", "bit_depth", "bit_rate", "bit_rate_mode", "sample_format", "duration", "leading_silence", "trailing_silence"}

// EvaluateGroups is Evaluate for a file measured with programme groups:
// the file-wide checks (container, rate, depth, duration, silence at the
// ends) are judged on the file, everything about a programme (loudness,
// peaks, range, fold-down, channels and layout, phase, clipping) per
// group, each against its own spec (specFor resolves a group's Spec
// name; nil means the file's spec for every group). The file's verdict is
// the worst of its checks and its groups'. A file without groups gets
// Evaluate's result.
func EvaluateGroups(spec *Spec, m *measure.Measurement, specFor func(name string) (*Spec, error)) Result {
	r := Evaluate(spec, m)
	if m == nil || m.Error != "" || len(m.Groups) == 0 {
		return r
	}
	keep := r.Checks[:0:0]
	for _, c := range r.Checks {
		if slices.Contains(fileWideChecks, c.ID) {
			keep = append(keep, c)
		}
	}
	r.Checks = keep
	r.SuggestedGainDB, r.LimiterReductionDB, r.Advice = nil, nil, ""
	r.Groups = []GroupResult{}
	verdicts := append([]Check(nil), r.Checks...)
	var advice []string
	for _, g := range m.Groups {
		decl, _ := spec.group(g.Name)
		gr := GroupResult{Name: g.Name, Channels: g.Channels, Streams: g.Streams, MeasureOnly: decl.MeasureOnly}
		gs := spec
		if decl.Spec != "" && specFor != nil {
			s, err := specFor(decl.Spec)
			if err != nil {
				gr.Result = Result{Measurement: &g.Measurement, Spec: decl.Spec, Verdict: Error, Checks: []Check{{
					ID: "integrity", Verdict: Error, Limit: "group spec " + decl.Spec, Reason: fmt.Sprintf("group %q: %v", g.Name, err)}}}
				r.Groups = append(r.Groups, gr)
				verdicts = append(verdicts, Check{Verdict: Error})
				continue
			}
			gs = s
		}
		if decl.MeasureOnly {
			gr.Result = Result{Measurement: &g.Measurement, Spec: "", LoudnessUnit: gs.Unit(), Verdict: Pass, Checks: []Check{}}
			r.Groups = append(r.Groups, gr)
			continue
		}
		gr.Result = Evaluate(gs, &g.Measurement)
		checks := gr.Checks[:0:0]
		for _, c := range gr.Checks {
			if !slices.Contains(fileWideChecks, c.ID) {
				checks = append(checks, c)
			}
		}
		gr.Checks = checks
		gr.Verdict = Worst(checks)
		if gr.Advice != "" {
			advice = append(advice, fmt.Sprintf("Group %s: %s", g.Name, gr.Advice))
		}
		verdicts = append(verdicts, Check{Verdict: gr.Verdict})
		r.Groups = append(r.Groups, gr)
	}
	r.Verdict = Worst(verdicts)
	r.Advice = strings.Join(advice, " ")
	return r
}
