package main

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"encoding/xml"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// demoDir is the bundled demo delivery folder (made by testdata/make-demo.go).
var demoDir = filepath.Join("..", "..", "testdata", "demo")

// kweigh runs the command line in-process and returns its exit status and
// output.
func kweigh(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errOut bytes.Buffer
	code = run(context.Background(), append([]string{"kweigh"}, args...), &out, &errOut)
	return code, out.String(), errOut.String()
}

type checkDoc struct {
	Files []struct {
		Path            string   `json:"path"`
		Spec            string   `json:"spec"`
		Verdict         string   `json:"verdict"`
		IntegratedLUFS  *float64 `json:"integrated_lufs"`
		SuggestedGainDB *float64 `json:"suggested_gain_db"`
		Channels        int      `json:"channels"`
		Error           string   `json:"error"`
		Checks          []struct {
			ID      string `json:"id"`
			Verdict string `json:"verdict"`
		} `json:"checks"`
	} `json:"files"`
}

// TestDemoVerdicts runs the README's main command over the demo deliveries
// and checks every file's verdict and the reason it carries. The demo files
// are invented; what is asserted is kweigh's judgement of them against the
// folder specs (testdata/demo/*/kweigh.toml).
func TestDemoVerdicts(t *testing.T) {
	code, out, stderr := kweigh(t, "check", demoDir, "--format", "json")
	if code != exitTrouble {
		t.Errorf("exit status %d, want %d (the corrupt archive file cannot be measured); stderr: %s", code, exitTrouble, stderr)
	}
	var doc checkDoc
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, out)
	}
	want := map[string]struct {
		spec, verdict string
		failing       []string // check ids that must fail
	}{
		"quillbrook-stream/quayside-sessions-ep03.flac":       {"quillbrook-stream", "pass", nil},
		"quillbrook-stream/quayside-sessions-ep04.flac":       {"quillbrook-stream", "warn", nil},
		"harbourlight-radio/archive-interview-1987.wav":       {"harbourlight-radio", "error", nil},
		"harbourlight-radio/harbour-lights-promo.wav":         {"harbourlight-radio", "fail", []string{"true_peak"}},
		"harbourlight-radio/tidewater-evenings-ep07.wav":      {"harbourlight-radio", "pass", nil},
		"harbourlight-radio/tidewater-evenings-ep08.wav":      {"harbourlight-radio", "fail", []string{"integrated", "bext_loudness"}},
		"harbourlight-radio/tidewater-evenings-ep09.wav":      {"harbourlight-radio", "fail", []string{"sample_rate"}},
		"harbourlight-radio/tidewater-evenings-ep10.wav":      {"harbourlight-radio", "fail", []string{"phase"}},
		"northgate-podcasts/lamplighters-almanac-s02e12.mp3":  {"northgate-podcasts", "pass", nil},
		"northgate-podcasts/lamplighters-almanac-s02e13.mp3":  {"northgate-podcasts", "fail", []string{"integrated"}},
		"northgate-podcasts/lamplighters-almanac-s02e14.flac": {"northgate-podcasts", "fail", []string{"trailing_silence"}},
	}
	var paths []string
	for _, f := range doc.Files {
		rel, _ := filepath.Rel(demoDir, f.Path)
		rel = filepath.ToSlash(rel)
		paths = append(paths, rel)
		w, ok := want[rel]
		if !ok {
			t.Errorf("unexpected file in output: %s", rel)
			continue
		}
		if f.Spec != w.spec || f.Verdict != w.verdict {
			t.Errorf("%s: spec %s verdict %s, want %s %s", rel, f.Spec, f.Verdict, w.spec, w.verdict)
		}
		for _, id := range w.failing {
			found := false
			for _, c := range f.Checks {
				found = found || (c.ID == id && c.Verdict == "fail")
			}
			if !found {
				t.Errorf("%s: check %s should fail; checks: %+v", rel, id, f.Checks)
			}
		}
	}
	if len(paths) != len(want) || !slices.IsSorted(paths) {
		t.Errorf("files %v: want all %d demo files in sorted order", paths, len(want))
	}
	// The mono podcast episode was levelled to the stereo target: kweigh
	// must judge it against the mono target (podcast practice −19 LUFS,
	// common practice, no published source) and suggest lowering it ~3 dB.
	for _, f := range doc.Files {
		if strings.HasSuffix(f.Path, "s02e13.mp3") {
			if f.Channels != 1 {
				t.Errorf("mono MP3 measured with %d channels, want 1", f.Channels)
			}
			if f.SuggestedGainDB == nil || *f.SuggestedGainDB > -2 || *f.SuggestedGainDB < -4 {
				t.Errorf("mono MP3 suggested gain %v, want about -3 dB", f.SuggestedGainDB)
			}
		}
	}
}

func TestCheckExitStatus(t *testing.T) {
	radio := filepath.Join(demoDir, "harbourlight-radio")
	tests := []struct {
		name string
		args []string
		want int
	}{
		{"pass", []string{"check", filepath.Join(radio, "tidewater-evenings-ep07.wav")}, exitOK},
		{"fail", []string{"check", filepath.Join(radio, "tidewater-evenings-ep08.wav")}, exitFailed},
		{"warn is a pass", []string{"check", filepath.Join(demoDir, "quillbrook-stream", "quayside-sessions-ep04.flac")}, exitOK},
		{"warn with --strict fails", []string{"check", "--strict", filepath.Join(demoDir, "quillbrook-stream", "quayside-sessions-ep04.flac")}, exitFailed},
		{"unmeasurable", []string{"check", filepath.Join(radio, "archive-interview-1987.wav")}, exitTrouble},
		{"no such file", []string{"check", "--spec", "ebu-r128", "no/such/file.wav"}, exitTrouble},
		{"unknown spec", []string{"check", "--spec", "no-such-spec", radio}, exitTrouble},
		{"unknown format", []string{"check", "--format", "yaml", radio}, exitTrouble},
		{"no files", []string{"check", "--spec", "ebu-r128"}, exitTrouble},
		{"unknown flag", []string{"check", "--loudest", radio}, exitTrouble},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if code, out, errOut := kweigh(t, tc.args...); code != tc.want {
				t.Errorf("exit %d, want %d\nstdout: %s\nstderr: %s", code, tc.want, out, errOut)
			}
		})
	}
}

// TestFlagAfterFileName guards against a parser that would take a flag
// after a file name as another file name and silently apply the default.
func TestFlagAfterFileName(t *testing.T) {
	file := filepath.Join(demoDir, "harbourlight-radio", "tidewater-evenings-ep07.wav")
	code, out, errOut := kweigh(t, "measure", file, "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var doc struct {
		Files []map[string]any `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Files) != 1 {
		t.Fatalf("--format after the file name was not applied: %v\n%s", err, out)
	}
}

// TestMeasureJSONKeys checks the documented keys of `measure --format json`
// (README.md, "JSON output") on a real file.
func TestMeasureJSONKeys(t *testing.T) {
	file := filepath.Join(demoDir, "harbourlight-radio", "tidewater-evenings-ep07.wav")
	code, out, _ := kweigh(t, "measure", "--format", "json", file)
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	var doc struct {
		Files []map[string]json.RawMessage `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	keys := []string{"path", "format", "sample_rate_hz", "channels", "channel_layout", "bits_per_sample",
		"sample_format", "duration_s", "integrated_lufs", "loudness_range_lu", "true_peak_dbtp",
		"sample_peak_dbfs", "max_momentary_lufs", "max_short_term_lufs", "channel_true_peak_dbtp", "bext", "notes"}
	for _, k := range keys {
		if _, ok := doc.Files[0][k]; !ok {
			t.Errorf("key %q missing", k)
		}
	}
	var layout []string
	json.Unmarshal(doc.Files[0]["channel_layout"], &layout)
	if !slices.Equal(layout, []string{"L", "R"}) {
		t.Errorf("channel_layout %v, want [L R]", layout)
	}
	var integrated float64
	json.Unmarshal(doc.Files[0]["integrated_lufs"], &integrated)
	// The demo generator levelled this file to -23.0 LUFS with the same
	// engine; the 24-bit quantisation moves it by far less than 0.05 LU.
	if integrated < -23.05 || integrated > -22.95 {
		t.Errorf("integrated %v, want -23.0", integrated)
	}
}

func TestMeasureJSONLStreamsEveryFile(t *testing.T) {
	code, out, _ := kweigh(t, "measure", "--format", "jsonl", "--jobs", "3", filepath.Join(demoDir, "northgate-podcasts"))
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 3 {
		t.Fatalf("%d lines, want 3 (one per audio file; kweigh.toml is not audio):\n%s", len(lines), out)
	}
	for _, l := range lines {
		var m map[string]any
		if err := json.Unmarshal([]byte(l), &m); err != nil {
			t.Errorf("line is not a JSON object: %v: %s", err, l)
		}
	}
}

func TestOutputFileKeepsTextOnTerminal(t *testing.T) {
	dir := t.TempDir()
	xmlPath := filepath.Join(dir, "results.xml")
	code, out, _ := kweigh(t, "check", "--format", "junit", "--output", xmlPath, filepath.Join(demoDir, "quillbrook-stream"))
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	if !strings.Contains(out, "quayside-sessions-ep03.flac") || !strings.Contains(out, "PASS") {
		t.Errorf("stdout should carry the text report:\n%s", out)
	}
	data, err := os.ReadFile(xmlPath)
	if err != nil {
		t.Fatal(err)
	}
	var suites struct {
		Tests int `xml:"tests,attr"`
	}
	if err := xml.Unmarshal(data, &suites); err != nil {
		t.Fatalf("JUnit output does not parse: %v", err)
	}
	if suites.Tests < 2 {
		t.Errorf("JUnit reports %d tests, want at least one per file and check", suites.Tests)
	}
}

func TestNonAudioSkippedWithNote(t *testing.T) {
	dir := t.TempDir()
	copyFile(t, filepath.Join(demoDir, "harbourlight-radio", "tidewater-evenings-ep07.wav"), filepath.Join(dir, "ep07.wav"))
	os.WriteFile(filepath.Join(dir, "cue-sheet.txt"), []byte("00:00 opening theme\n"), 0o644)
	code, out, errOut := kweigh(t, "measure", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(errOut, "cue-sheet.txt") || strings.Contains(out, "cue-sheet.txt") {
		t.Errorf("cue-sheet.txt should be skipped with a note on stderr; stdout:\n%s\nstderr:\n%s", out, errOut)
	}
	// Named explicitly, a non-audio file is an error.
	if code, _, _ := kweigh(t, "measure", filepath.Join(dir, "cue-sheet.txt")); code != exitTrouble {
		t.Errorf("explicit non-audio file: exit %d, want %d", code, exitTrouble)
	}
}

func TestUnreadableFileDoesNotStopBatch(t *testing.T) {
	dir := t.TempDir()
	copyFile(t, filepath.Join(demoDir, "harbourlight-radio", "tidewater-evenings-ep07.wav"), filepath.Join(dir, "a.wav"))
	if err := os.Symlink(filepath.Join(dir, "gone.wav"), filepath.Join(dir, "b.wav")); err != nil {
		t.Skip("symlinks not available")
	}
	copyFile(t, filepath.Join(demoDir, "harbourlight-radio", "tidewater-evenings-ep07.wav"), filepath.Join(dir, "c.wav"))
	code, out, _ := kweigh(t, "measure", "--format", "json", dir)
	if code != exitTrouble {
		t.Errorf("exit %d, want %d", code, exitTrouble)
	}
	var doc struct {
		Files []struct {
			Path  string   `json:"path"`
			Error string   `json:"error"`
			I     *float64 `json:"integrated_lufs"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Files) != 3 {
		t.Fatalf("%d files reported, want 3", len(doc.Files))
	}
	if doc.Files[0].I == nil || doc.Files[2].I == nil {
		t.Error("the readable files around the bad one must still be measured")
	}
	if !strings.Contains(doc.Files[1].Error, "b.wav") {
		t.Errorf("error %q should name the file", doc.Files[1].Error)
	}
}

func TestFolderSpecAndExplicitSpec(t *testing.T) {
	dir := t.TempDir()
	copyFile(t, filepath.Join(demoDir, "harbourlight-radio", "tidewater-evenings-ep09.wav"), filepath.Join(dir, "ep09.wav"))
	// No spec anywhere: a usage error that says what to do.
	if code, _, errOut := kweigh(t, "check", dir); code != exitTrouble || !strings.Contains(errOut, "--spec") {
		t.Errorf("no spec: exit %d, stderr %q", code, errOut)
	}
	// ep09 is 44.1 kHz at -23 LUFS: EBU R 128 has no format rule, so it passes.
	if code, out, _ := kweigh(t, "check", "--spec", "ebu-r128", dir); code != exitOK {
		t.Errorf("--spec ebu-r128: exit %d\n%s", code, out)
	}
	// A house spec in the folder applies when no --spec is given, and
	// rejects 44.1 kHz.
	copyFile(t, filepath.Join(demoDir, "harbourlight-radio", "kweigh.toml"), filepath.Join(dir, "kweigh.toml"))
	if code, out, _ := kweigh(t, "check", dir); code != exitFailed || !strings.Contains(out, "sample_rate") {
		t.Errorf("folder spec: exit %d\n%s", code, out)
	}
	// An explicit --spec wins over the folder's.
	if code, out, _ := kweigh(t, "check", "--spec", "ebu-r128", dir); code != exitOK {
		t.Errorf("--spec over a folder spec: exit %d\n%s", code, out)
	}
	// A folder spec further up the tree governs the folders below it.
	sub := filepath.Join(dir, "week-48")
	os.Mkdir(sub, 0o755)
	copyFile(t, filepath.Join(dir, "ep09.wav"), filepath.Join(sub, "ep09-again.wav"))
	code, out, _ := kweigh(t, "check", "--format", "json", dir)
	var doc checkDoc
	if err := json.Unmarshal([]byte(out), &doc); err != nil || code != exitFailed {
		t.Fatalf("exit %d, %v", code, err)
	}
	for _, f := range doc.Files {
		if f.Spec != "harbourlight-radio" {
			t.Errorf("%s judged by %q, want the house spec of the folder above", f.Path, f.Spec)
		}
	}
}

func TestSpecTypoRejectedWithLine(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "house.toml")
	os.WriteFile(path, []byte("name = \"house\"\nextends = \"ebu-r128\"\n\n[loudness]\nmax_truepeak_dbtp = -2.0\n"), 0o644)
	code, out, _ := kweigh(t, "specs", "check", path)
	if code != exitTrouble {
		t.Errorf("exit %d, want %d", code, exitTrouble)
	}
	if !strings.Contains(out, "house.toml:5") || !strings.Contains(out, "max_truepeak_dbtp") {
		t.Errorf("error should give file, line 5 and the key:\n%s", out)
	}
	// The same file given to check is a usage error before anything is measured.
	if code, _, errOut := kweigh(t, "check", "--spec", path, demoDir); code != exitTrouble || !strings.Contains(errOut, ":5") {
		t.Errorf("check --spec with a bad file: exit %d, stderr %q", code, errOut)
	}
}

func TestSpecsList(t *testing.T) {
	code, out, _ := kweigh(t, "specs")
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	// Spec ids are the standards' own names in lower case (issue 4).
	for _, id := range []string{"ebu-r128", "ebu-r128-s1", "atsc-a85", "arib-tr-b32", "op-59", "aes-td1004", "aes-td1008", "podcast"} {
		if !strings.Contains(out, id) {
			t.Errorf("spec %s not listed", id)
		}
	}
	code, out, _ = kweigh(t, "specs", "show", "ebu-r128")
	// EBU R 128 v4.0 (2020): -23.0 LUFS target, ±1 LU production tolerance.
	if code != exitOK || !strings.Contains(out, "-23.0") || !strings.Contains(out, "R 128") {
		t.Errorf("specs show ebu-r128: exit %d\n%s", code, out)
	}
}

func TestReportAndPlots(t *testing.T) {
	dir := t.TempDir()
	report := filepath.Join(dir, "qc.html")
	plots := filepath.Join(dir, "plots")
	code, _, errOut := kweigh(t, "check", "--report", report, "--plots", plots, filepath.Join(demoDir, "quillbrook-stream"))
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	page, err := os.ReadFile(report)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"quayside-sessions-ep03.flac", "quayside-sessions-ep04.flac", "<svg"} {
		if !bytes.Contains(page, []byte(want)) {
			t.Errorf("report lacks %q", want)
		}
	}
	svgs, _ := filepath.Glob(filepath.Join(plots, "*.svg"))
	if len(svgs) != 2 {
		t.Errorf("%d plots written, want 2: %v", len(svgs), svgs)
	}
}

func copyFile(t *testing.T, from, to string) {
	t.Helper()
	data, err := os.ReadFile(from)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(to, data, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestEmptyDeliveryIsAnError: a pipeline gate must not pass a delivery
// folder with nothing in it, or with nothing that is audio.
func TestEmptyDeliveryIsAnError(t *testing.T) {
	empty := t.TempDir()
	notes := t.TempDir()
	os.WriteFile(filepath.Join(notes, "running-order.txt"), []byte("1. cold open\n"), 0o644)
	for _, dir := range []string{empty, notes} {
		for _, cmd := range [][]string{{"measure", dir}, {"check", "--spec", "ebu-r128", dir}} {
			code, _, errOut := kweigh(t, cmd...)
			if code != exitTrouble || !strings.Contains(errOut, "no audio files") {
				t.Errorf("%v: exit %d, stderr %q", cmd, code, errOut)
			}
		}
	}
}

func TestSkipFlacMD5(t *testing.T) {
	file := filepath.Join(demoDir, "quillbrook-stream", "quayside-sessions-ep03.flac")
	for _, tc := range []struct {
		args []string
		note bool
	}{
		{[]string{"measure", "--format", "json", "--skip-flac-md5", file}, true},
		{[]string{"measure", "--format", "json", file}, false}, // verification is on by default
	} {
		code, out, _ := kweigh(t, tc.args...)
		if code != exitOK {
			t.Fatalf("%v: exit %d", tc.args, code)
		}
		if got := strings.Contains(out, "MD5 verification turned off"); got != tc.note {
			t.Errorf("%v: note present %v, want %v", tc.args, got, tc.note)
		}
	}
}

// TestMeasureUndeclaredIsIncomplete: `measure` of a WAV whose data chunk
// declares half of the audio the file holds measures the declared half,
// says so in its summary (text and JSON) and exits 2, as for damaged audio
// (README.md, "Exit status").
func TestMeasureUndeclaredIsIncomplete(t *testing.T) {
	a := audiotest.DBFS(-18)
	wav := audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 4, 997, a, a))
	at := bytes.Index(wav, []byte("data"))
	declared := binary.LittleEndian.Uint32(wav[at+4:]) / 2
	binary.LittleEndian.PutUint32(wav[at+4:], declared)
	binary.LittleEndian.PutUint32(wav[4:], uint32(at+8-8)+declared)
	path := filepath.Join(t.TempDir(), "rough-cut.wav")
	if err := os.WriteFile(path, wav, 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ := kweigh(t, "measure", path)
	if code != exitTrouble || !strings.Contains(out, "(1 only as far as the header declares)") {
		t.Errorf("text: exit %d, output\n%s", code, out)
	}
	code, out, _ = kweigh(t, "measure", "--format", "json", path)
	var doc struct {
		Files []struct {
			DurationS float64 `json:"duration_s"`
		} `json:"files"`
		Summary map[string]float64 `json:"summary"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if code != exitTrouble || doc.Summary["undeclared"] != 1 || len(doc.Files) != 1 || doc.Files[0].DurationS != 2 {
		t.Errorf("json: exit %d, summary %v, files %+v", code, doc.Summary, doc.Files)
	}
}
