package rules

import (
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
)

const groupSpec = `name = "tidewater-8ch"
extends = "ebu-r128"

[record]
job = "TW-2291"
client = "Harbourlight Television"
operator = "Mara Quillfeather"

[[group]]
name = "main"
channels = "1-6"
layout = "5.1"

[[group]]
name = "stereo"
channels = [7, 8]
layout = "stereo"
spec = "atsc-a85"

[[group]]
name = "me"
channels = "9-10"
measure_only = true
`

// TestSpecGroups: [[group]] and [record] read from a spec file, and
// their mistakes reported with the group.
func TestSpecGroups(t *testing.T) {
	s, err := Parse("kweigh.toml", []byte(groupSpec))
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Groups) != 3 || s.Groups[0].Name != "main" || !slices.Equal(s.Groups[0].Channels, []int{1, 2, 3, 4, 5, 6}) ||
		len(s.Groups[0].Layout) != 6 || !slices.Equal(s.Groups[1].Channels, []int{7, 8}) || s.Groups[1].Spec != "atsc-a85" ||
		!s.Groups[2].MeasureOnly || s.Groups[2].Layout != nil {
		t.Errorf("groups %+v", s.Groups)
	}
	if s.Record != (RecordFields{Job: "TW-2291", Client: "Harbourlight Television", Operator: "Mara Quillfeather"}) {
		t.Errorf("record %+v", s.Record)
	}
	if c := s.Clone(); len(c.Groups) != 3 || &c.Groups[0].Channels[0] == &s.Groups[0].Channels[0] {
		t.Error("Clone shares the groups")
	}
	for _, c := range []struct {
		toml              string
		streams, channels []int
	}{
		{"stream = 2", []int{2}, nil},
		{"stream = \"1-2\"", []int{1, 2}, nil},
		{"streams = [3, 5]", []int{3, 5}, nil},
		{"stream = 2\nchannels = \"1-2\"", []int{2}, []int{1, 2}},
	} {
		s, err := Parse("kweigh.toml", []byte("extends = \"ebu-r128\"\n[[group]]\nname = \"a\"\n"+c.toml))
		if err != nil || len(s.Groups) != 1 || !slices.Equal(s.Groups[0].Streams, c.streams) || !slices.Equal(s.Groups[0].Channels, c.channels) {
			t.Errorf("%q: %+v %v", c.toml, s, err)
		}
	}
	for _, bad := range []struct{ toml, want string }{
		{"[[group]]\nname = \"a\"\nstream = 0", "numbered from 1"},
		{"[[group]]\nname = \"a\"\nstream = \"x\"", "stream"},
		{"[[group]]\nname = \"a\"\nstream = \"1-2\"\nchannels = \"1\"", "exactly one stream"},
		{"[[group]]\nname = \"a\"\nstream = 1\nchannels = \"1-2\"\nlayout = \"5.1\"", "its layout"},
		{"[[group]]\nchannels = \"1-2\"", "has no name"},
		{"[[group]]\nname = \"a\"", "has no channels"},
		{"[[group]]\nname = \"a\"\nchannels = \"2-1\"", "runs backwards"},
		{"[[group]]\nname = \"a\"\nchannels = \"1-2\"\nlayout = \"5.1\"", "its layout"},
		{"[[group]]\nname = \"a\"\nchannels = \"1\"\n[[group]]\nname = \"a\"\nchannels = \"2\"", "declared twice"},
		{"[[group]]\nname = \"a\"\nchannels = \"1\"\nlanguage = \"fr\"", "unknown key"},
		{"[record]\nreviewer = \"x\"", "unknown key"},
		{"group = 3", "list of tables"},
	} {
		_, err := Parse("kweigh.toml", []byte("extends = \"ebu-r128\"\n"+bad.toml))
		if err == nil || !strings.Contains(err.Error(), bad.want) {
			t.Errorf("%q: %v, want %q", bad.toml, err, bad.want)
		}
	}
}

// groupOf makes a group measurement from a clean stereo measurement.
func groupOf(name string, chans []int, integrated, tp float64) *measure.GroupMeasurement {
	return &measure.GroupMeasurement{Name: name, Channels: chans, Measurement: *cleanStereo(integrated, tp)}
}

// TestEvaluateGroups: each group judged against its own spec, measure-only
// groups left unjudged, the file's verdict the worst of all; the figures
// of the file as a whole (7.1 here, meaningless) are not judged.
func TestEvaluateGroups(t *testing.T) {
	s, err := Parse("kweigh.toml", []byte(groupSpec))
	if err != nil {
		t.Fatal(err)
	}
	m := cleanStereo(-12, -0.5) // the whole file's figures: would fail R 128
	m.Channels = 10
	m.Groups = []*measure.GroupMeasurement{
		groupOf("main", []int{1, 2, 3, 4, 5, 6}, -23.0, -2),
		groupOf("stereo", []int{7, 8}, -24.0, -3), // ATSC A/85: −24 LKFS ±2 (see builtin.go)
		groupOf("me", []int{9, 10}, -40, -20),     // measure only
	}
	specFor := func(name string) (*Spec, error) { return Lookup(name) }
	r := EvaluateGroups(s, m, specFor)
	if r.Verdict != Pass || len(r.Groups) != 3 {
		t.Fatalf("verdict %s, %d groups: %+v", r.Verdict, len(r.Groups), r.Checks)
	}
	if _, ok := findCheck(r, "integrated"); ok {
		t.Error("the file's own integrated loudness is judged despite groups")
	}
	if _, ok := findCheck(r, "integrity"); !ok {
		t.Error("file-wide checks missing")
	}
	if r.Groups[1].Spec != "atsc-a85" || r.Groups[1].LoudnessUnit != "LKFS" || r.Groups[0].Spec != "tidewater-8ch" {
		t.Errorf("group specs %q %q", r.Groups[0].Spec, r.Groups[1].Spec)
	}
	if g := r.Groups[2]; !g.MeasureOnly || len(g.Checks) != 0 {
		t.Errorf("measure-only group judged: %+v", g.Checks)
	}
	// The stereo mix 3 LU hot fails the file, with the group named in the
	// advice.
	m.Groups[1] = groupOf("stereo", []int{7, 8}, -19.0, -3)
	r = EvaluateGroups(s, m, specFor)
	if r.Verdict != Fail || r.Groups[1].Verdict != Fail || r.Groups[0].Verdict != Pass || !strings.HasPrefix(r.Advice, "Group stereo: Lower the level by 5.0 dB to reach -24.0 LKFS.") {
		t.Errorf("verdict %s, groups %s/%s, advice %q", r.Verdict, r.Groups[0].Verdict, r.Groups[1].Verdict, r.Advice)
	}
	// A group spec that does not exist is that group's error.
	r = EvaluateGroups(s, m, func(string) (*Spec, error) { return nil, errNoSuchSpec })
	if r.Verdict != Error || r.Groups[1].Verdict != Error {
		t.Errorf("missing group spec: %s", r.Verdict)
	}
}

var errNoSuchSpec = &SpecError{File: "stereo.toml", Problem: "no such file"}

// TestSectionAdvice: a failing file whose excess comes from a hot intro is
// told to fix that section (the figures are the event's, as measured).
func TestSectionAdvice(t *testing.T) {
	m := cleanStereo(-20.0, -3)
	v := 4.5
	m.Events = []measure.Event{{Kind: measure.EventLoudSection, StartS: 0, EndS: 25, Value: &v, Unit: "LU"}}
	r := Evaluate(mustLookup(t, "ebu-r128"), m)
	if !strings.Contains(r.Advice, "The first 0:25 runs 4.5 LU above the rest of the programme: fix that section rather than the whole file.") {
		t.Errorf("advice %q", r.Advice)
	}
	m = cleanStereo(-23.0, -3)
	m.Events = []measure.Event{{Kind: measure.EventLoudSection, StartS: 0, EndS: 25, Value: &v, Unit: "LU"}}
	if r := Evaluate(mustLookup(t, "ebu-r128"), m); strings.Contains(r.Advice, "section") {
		t.Errorf("a passing file is told about its section: %q", r.Advice)
	}
}
