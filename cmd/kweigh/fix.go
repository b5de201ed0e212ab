package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"runtime"
	"strings"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/fix"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

// fixCautions are printed in fix's help and after its output.
var fixCautions = []string{
	"A positive gain makes a file louder: audition corrected files at a safe monitoring level, and turn down before playing one.",
	"A pass is kweigh's reading of the spec, not the receiving party's acceptance: their own QC and local regulation decide.",
}

func fixCommand() *cli.Command {
	return &cli.Command{
		Name:      "fix",
		Usage:     "bring files to a delivery spec: gain, a true-peak limiter, and a re-check of what was written",
		ArgsUsage: "FILE|DIR...",
		Description: "For every audio file named (folders recursively) whose integrated loudness or true peak fails\n" +
			"or warns: works out the gain that puts integrated loudness on the spec's aim (its target, the\n" +
			"middle of a window, the mono target for mono files), runs kweigh's true-peak limiter when that\n" +
			"gain would cross the ceiling (iterating the gain until the loudness is on the aim within 0.1 LU),\n" +
			"writes the corrected file in the input's format, then MEASURES AND JUDGES THE OUTPUT and reports\n" +
			"before and after. Files that already pass are left alone unless --always.\n\n" +
			"Outputs: NAME.fixed.EXT beside the input; --out DIR writes there keeping names (and sub-folders);\n" +
			"--in-place replaces the input atomically. Existing outputs are kept unless --force. WAV, BWF,\n" +
			"RF64/BW64 and AIFF keep every other chunk; BWF bext loudness fields get the output's values.\n" +
			"FLAC is re-encoded and verified; MP3 is re-encoded with lame when it is on PATH (else a WAV is\n" +
			"written for you to encode).\n\n" +
			"CAUTION: " + strings.Join(fixCautions, "\n         ") + "\n\n" +
			"EXIT STATUS:\n" +
			"   0  every output (or untouched input) passes\n" +
			"   1  a file was refused or still fails its spec\n" +
			"   2  a file could not be read or written, no audio file was found, or the command line is wrong\n",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "spec", Aliases: []string{"s"}, Usage: "delivery spec `NAME` (a built-in id, see 'kweigh specs') or a TOML file, for every file; without it each file's nearest kweigh.toml decides, as for check"},
			&cli.IntFlag{Name: "jobs", Aliases: []string{"j"}, Value: runtime.NumCPU(), Usage: "files corrected at once"},
			&cli.StringFlag{Name: "out", Usage: "write outputs into `DIR`, keeping their names"},
			&cli.BoolFlag{Name: "in-place", Usage: "replace each input with its corrected version (atomically: temporary file, fsync, rename)"},
			&cli.BoolFlag{Name: "force", Usage: "replace outputs that already exist"},
			&cli.BoolFlag{Name: "always", Usage: "also correct files that already pass, to the exact aim"},
			&cli.FloatFlag{Name: "max-limiting", Value: fix.DefaultMaxLimitingDB, Usage: "refuse files that need more than `DB` of peak reduction"},
			&cli.BoolFlag{Name: "no-limiter", Usage: "apply gain only; refuse files whose gain would cross the true-peak ceiling"},
			&cli.FloatFlag{Name: "ceiling-margin", Value: fix.DefaultMarginDB, Usage: "aim the limiter `DB` under the spec's true-peak ceiling"},
			&cli.BoolFlag{Name: "dry-run", Usage: "say what would be done; write nothing"},
			&cli.StringFlag{Name: "format", Aliases: []string{"f"}, Value: "text", Usage: "output format: text, json"},
			&cli.StringFlag{Name: "layout", Usage: "channel layout for files without (or with a wrong) one: mono, stereo, 5.0, 5.1, 7.1 or labels like L,R,C,LFE,Ls,Rs"},
		},
		Action: func(ctx context.Context, cmd *cli.Command) error {
			o, err := readFixOptions(cmd)
			if err != nil {
				return err
			}
			return runFix(ctx, o, cmd.Args().Slice(), cmd.Root().Writer, cmd.Root().ErrWriter)
		},
	}
}

// fixOptions are fix's parsed options.
type fixOptions struct {
	fix.Options
	json bool
	jobs int
}

func readFixOptions(cmd *cli.Command) (fixOptions, error) {
	var o fixOptions
	if name := cmd.String("spec"); name != "" {
		s, err := engine.LoadSpec(name)
		if err != nil {
			return o, usageError{err}
		}
		o.Spec = s
	}
	if o.jobs = cmd.Int("jobs"); o.jobs < 1 {
		return o, usagef("--jobs must be at least 1")
	}
	switch f := cmd.String("format"); f {
	case "text":
	case "json":
		o.json = true
	default:
		return o, usagef("--format %s is not available for fix (text, json)", f)
	}
	o.OutDir = cmd.String("out")
	o.InPlace = cmd.Bool("in-place")
	o.Force = cmd.Bool("force")
	o.Always = cmd.Bool("always")
	o.MaxLimitingDB = cmd.Float("max-limiting")
	o.NoLimiter = cmd.Bool("no-limiter")
	o.MarginDB = cmd.Float("ceiling-margin")
	o.DryRun = cmd.Bool("dry-run")
	if o.InPlace && o.OutDir != "" {
		return o, usagef("--in-place and --out exclude each other")
	}
	if o.MaxLimitingDB < 0 || o.MarginDB < 0 || o.MarginDB > 3 {
		return o, usagef("--max-limiting must be ≥ 0 and --ceiling-margin between 0 and 3 dB")
	}
	if l := cmd.String("layout"); l != "" {
		labels, err := decode.ParseLayout(l)
		if err != nil {
			return o, usagef("--layout: %v", err)
		}
		o.Measure.Layout = labels
	}
	return o, nil
}

// fixTargets collects the files to correct the way check does
// (engine.Collect), leaving out outputs of earlier runs (NAME.fixed.EXT)
// found in folders.
func fixTargets(args []string) ([]engine.Target, error) {
	all, err := engine.Collect(args)
	if err != nil {
		return nil, err
	}
	out := all[:0]
	for _, t := range all {
		if t.Explicit || !isFixOutput(filepath.Base(t.Path)) {
			out = append(out, t)
		}
	}
	return out, nil
}

// subFolder is the folder of a found file below the argument it was found
// under: where its output goes under --out.
func subFolder(t engine.Target) string {
	if t.Explicit {
		return ""
	}
	rel, err := filepath.Rel(t.Root, filepath.Dir(t.Path))
	if err != nil {
		return ""
	}
	return rel
}

// sharesOutputName reports whether two targets would get the same output
// name under --out (files named on the command line from different
// folders).
func sharesOutputName(ts []engine.Target) bool {
	seen := map[string]bool{}
	for _, t := range ts {
		k := filepath.Join(subFolder(t), filepath.Base(t.Path))
		if seen[k] {
			return true
		}
		seen[k] = true
	}
	return false
}

// isFixOutput reports whether a name is one fix writes beside inputs.
func isFixOutput(name string) bool {
	base := strings.TrimSuffix(name, filepath.Ext(name))
	return strings.HasSuffix(base, ".fixed")
}

// fixDoc is the JSON document of fix.
type fixDoc struct {
	Tool     string        `json:"tool"`
	Version  string        `json:"version"`
	Files    []*fix.Record `json:"files"`
	Cautions []string      `json:"cautions"`
}

// runFix corrects the files under args.
func runFix(ctx context.Context, o fixOptions, args []string, stdout, stderr io.Writer) error {
	targets, err := fixTargets(args)
	if err != nil {
		return usageError{err}
	}
	doc := fixDoc{Tool: "kweigh", Version: version, Files: []*fix.Record{}, Cautions: fixCautions}
	worst := fix.OK
	raised := false
	dests := map[string]string{}
	specs := engine.NewSpecs()
	work := func(ctx context.Context, i int) *fix.Record {
		t := targets[i]
		opt := o.Options
		if opt.OutDir != "" {
			opt.OutDir = filepath.Join(opt.OutDir, subFolder(t))
		}
		if opt.Spec == nil {
			s, _, err := specs.Find(t.Path)
			if err != nil {
				return fix.Unjudged(t.Path, err)
			}
			opt.Spec = s
		}
		return fix.File(ctx, t.Path, opt)
	}
	emit := func(i int, r *fix.Record) {
		t := targets[i]
		if !t.Explicit && r.Action == fix.Failed && errors.Is(r.Err, decode.ErrUnknownFormat) && !decode.HasAudioExtension(t.Path) {
			fmt.Fprintf(stderr, "kweigh: %s: not audio, skipped\n", reports.Printable(t.Path))
			return
		}
		if r.Output != nil && !o.InPlace {
			if prev, ok := dests[*r.Output]; ok {
				r.Notes = append(r.Notes, fmt.Sprintf("this output replaced the one written for %s in this run (same name under --out)", prev))
			}
			dests[*r.Output] = t.Path
		}
		raised = raised || (r.GainDB != nil && *r.GainDB > 0 && r.Action != fix.Refused && r.Action != fix.Failed)
		worst = max(worst, r.Outcome())
		doc.Files = append(doc.Files, r)
		if !o.json {
			writeFixText(stdout, r, o.DryRun)
		}
	}
	// Two files may not write the same output at once: with --out, files of
	// the same name from different folders are corrected one at a time.
	jobs := o.jobs
	if o.OutDir != "" && sharesOutputName(targets) {
		jobs = 1
	}
	engine.RunEach(ctx, len(targets), jobs, work, emit, true)
	if len(doc.Files) == 0 {
		return errNoAudio(args)
	}
	if o.json {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(doc); err != nil {
			return err
		}
	} else {
		writeFixSummary(stdout, doc.Files, raised)
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("interrupted: %w", err)
	}
	switch worst {
	case fix.Trouble:
		return troubleError{countOutcome(doc.Files, fix.Trouble)}
	case fix.NotFixed:
		return failedError{countOutcome(doc.Files, fix.NotFixed)}
	}
	return nil
}

func countOutcome(rs []*fix.Record, o fix.Outcome) int {
	n := 0
	for _, r := range rs {
		if r.Outcome() == o {
			n++
		}
	}
	return n
}

// writeFixText writes one file's outcome for people.
func writeFixText(w io.Writer, r *fix.Record, dry bool) {
	word := map[fix.Action]string{
		fix.NoneNeeded: "OK       ✓", fix.Gain: "FIXED    ✓", fix.GainAndLimiting: "FIXED    ✓",
		fix.Refused: "REFUSED  ✗", fix.Failed: "ERROR    ⊘",
	}[r.Action]
	switch {
	case dry && (r.Action == fix.Gain || r.Action == fix.GainAndLimiting):
		word = "PLAN     ·"
	case r.Outcome() == fix.NotFixed && r.Action != fix.Refused:
		word = "FAILS    ✗"
	}
	fmt.Fprintf(w, "%s  %s", word, r.Path)
	if r.Output != nil && *r.Output != r.Path {
		fmt.Fprintf(w, "  →  %s", *r.Output)
	}
	fmt.Fprintln(w)
	line := func(label string, res *rules.Result) {
		if res == nil || res.Measurement == nil || res.Measurement.Error != "" {
			return
		}
		m := res.Measurement
		fmt.Fprintf(w, "           %-7s %s LUFS · true peak %s dBTP · %s\n", label, reports.Loudness(m.IntegratedLUFS), reports.Peak(m.TruePeakDBTP), res.Verdict)
	}
	line("before", r.Before)
	if r.Action != fix.NoneNeeded {
		line("after", r.After)
	}
	switch r.Action {
	case fix.Gain, fix.GainAndLimiting:
		s := "gain " + reports.Gain(*r.GainDB) + " dB"
		if r.LimitingDB != nil {
			s += ", true-peak limiting " + reports.Fixed(*r.LimitingDB, 1) + " dB"
		}
		if r.Passes > 0 {
			s += fmt.Sprintf(" (%d passes)", r.Passes)
		}
		if r.SizeRatio != nil {
			s += fmt.Sprintf(", output %.2f × the input's size", *r.SizeRatio)
		}
		fmt.Fprintf(w, "           %s\n", s)
		if r.After != nil && r.After.Verdict != rules.Pass {
			for _, c := range r.After.Checks {
				if c.Verdict == rules.Fail || c.Verdict == rules.Warn {
					fmt.Fprintf(w, "           %s %s: %s\n", c.Verdict, c.ID, c.Reason)
				}
			}
		}
	}
	if r.Reason != "" && r.Action != fix.Gain && r.Action != fix.GainAndLimiting || dry {
		fmt.Fprintf(w, "           %s\n", r.Reason)
	}
	for _, n := range r.Notes {
		fmt.Fprintf(w, "           note: %s\n", n)
	}
}

// writeFixSummary writes the counts and the cautions.
func writeFixSummary(w io.Writer, rs []*fix.Record, raised bool) {
	counts := map[fix.Action]int{}
	for _, r := range rs {
		counts[r.Action]++
	}
	fmt.Fprintf(w, "\n%d file(s): %d corrected, %d needed nothing, %d refused, %d error(s)\n",
		len(rs), counts[fix.Gain]+counts[fix.GainAndLimiting], counts[fix.NoneNeeded], counts[fix.Refused], counts[fix.Failed])
	if raised {
		fmt.Fprintln(w, "CAUTION: "+fixCautions[0])
	}
	fmt.Fprintln(w, "Note: "+fixCautions[1])
}
