package reports

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// groupResult is an invented 8-channel delivery of Kestrel Lane Audio
// with a 5.1 and a stereo group, the stereo one failing (figures are
// invented input for the writers).
func groupResult() *rules.Result {
	m := stereoPass()
	m.Path = "deliveries/hollow-orchard/HO_S02E06_printmaster_8ch.wav"
	m.Channels = 8
	main := &measure.GroupMeasurement{Name: "main", Channels: []int{1, 2, 3, 4, 5, 6}, Measurement: *surroundTooLoud()}
	main.IntegratedLUFS = num(-23.1)
	stereo := &measure.GroupMeasurement{Name: "stereo", Channels: []int{7, 8}, Measurement: *stereoPass()}
	stereo.IntegratedLUFS = num(-19.4)
	m.Groups = []*measure.GroupMeasurement{main, stereo}
	fail := rules.Check{ID: "integrated", Verdict: rules.Fail, Measured: -19.4, Unit: "LUFS", Limit: "-23.0 LUFS ±1.0 LU", Reason: "integrated -19.4 LUFS is 3.6 LU above the -23.0 LUFS target"}
	return &rules.Result{Measurement: m, Spec: "ebu-r128", Verdict: rules.Fail, Checks: []rules.Check{},
		Advice: "Group stereo: Lower the level by 3.6 dB to reach -23.0 LUFS.",
		Groups: []rules.GroupResult{
			{Name: "main", Channels: main.Channels, Result: rules.Result{Measurement: &main.Measurement, Spec: "ebu-r128", Verdict: rules.Pass, Checks: []rules.Check{}}},
			{Name: "stereo", Channels: stereo.Channels, Result: rules.Result{Measurement: &stereo.Measurement, Spec: "ebu-r128", Verdict: rules.Fail, Checks: []rules.Check{fail}}},
		}}
}

// TestGroupsInReports: JSON carries each group with its channel numbers
// (a list, not the count), layout, figures, verdict and checks; the text
// report shows each group with its verdict and what failed.
func TestGroupsInReports(t *testing.T) {
	var b bytes.Buffer
	w, err := NewCheckWriter(&b, JSON, testOptions())
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Write(groupResult()); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(Summary{Files: 1, Failed: 1}); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Files []struct {
			Channels int `json:"channels"`
			Groups   []struct {
				Name       string            `json:"name"`
				Channels   []int             `json:"channels"`
				Layout     []string          `json:"channel_layout"`
				Integrated float64           `json:"integrated_lufs"`
				Verdict    string            `json:"verdict"`
				Checks     []json.RawMessage `json:"checks"`
			} `json:"groups"`
		} `json:"files"`
	}
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("%v\n%s", err, b.String())
	}
	g := doc.Files[0].Groups
	if doc.Files[0].Channels != 8 || len(g) != 2 || g[1].Name != "stereo" || len(g[1].Channels) != 2 || g[1].Channels[0] != 7 ||
		len(g[0].Layout) != 6 || g[1].Integrated != -19.4 || g[1].Verdict != "fail" || len(g[1].Checks) != 1 || g[0].Checks == nil {
		t.Errorf("groups %+v", g)
	}

	b.Reset()
	w, _ = NewCheckWriter(&b, Text, testOptions())
	w.Write(groupResult())
	w.Close(Summary{Files: 1, Failed: 1})
	text := b.String()
	for _, want := range []string{
		"FAIL  ✗  group stereo (channels 7-8, L R)",
		"PASS  ✓  group main (channels 1-6, L R C LFE Ls Rs)",
		"integrated -19.4 LUFS is 3.6 LU above the -23.0 LUFS target",
		"advice: Group stereo: Lower the level by 3.6 dB",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q:\n%s", want, text)
		}
	}
}

// TestGroupsInFlatFormats: CSV names a failing group's checks as
// GROUP/ID in failed_checks (the file's own checks are empty with groups,
// so without them a failing file would show no failure), and JUnit gives
// each group's check a test case of that name with its failure.
func TestGroupsInFlatFormats(t *testing.T) {
	var b bytes.Buffer
	w, err := NewCheckWriter(&b, CSV, testOptions())
	if err != nil {
		t.Fatal(err)
	}
	w.Write(groupResult())
	w.Close(Summary{Files: 1, Failed: 1})
	rows, err := csv.NewReader(strings.NewReader(b.String())).ReadAll()
	if err != nil || len(rows) != 2 {
		t.Fatalf("csv %v:\n%s", err, b.String())
	}
	col := slices.Index(rows[0], "failed_checks")
	if col < 0 || rows[1][col] != "stereo/integrated" {
		t.Errorf("failed_checks column %d: %q", col, rows[1])
	}

	b.Reset()
	w, _ = NewCheckWriter(&b, JUnit, testOptions())
	w.Write(groupResult())
	w.Close(Summary{Files: 1, Failed: 1})
	var suites struct {
		Suites []struct {
			Cases []struct {
				Name    string `xml:"name,attr"`
				Failure *struct {
					Message string `xml:"message,attr"`
				} `xml:"failure"`
			} `xml:"testcase"`
		} `xml:"testsuite"`
	}
	if err := xml.Unmarshal(b.Bytes(), &suites); err != nil || len(suites.Suites) != 1 {
		t.Fatalf("junit %v:\n%s", err, b.String())
	}
	cs := suites.Suites[0].Cases
	if len(cs) != 1 || cs[0].Name != "stereo/integrated" || cs[0].Failure == nil ||
		!strings.Contains(cs[0].Failure.Message, "3.6 LU above") {
		t.Errorf("junit cases %+v\n%s", cs, b.String())
	}
}
