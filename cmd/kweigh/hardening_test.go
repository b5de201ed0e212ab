package main

import (
	"bytes"
	"context"
	"encoding/json"
	"encoding/xml"
	"math/rand"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// lineUpWAV is 2 s of a -23 dBFS 997 Hz stereo tone, 16-bit, 48 kHz.
func lineUpWAV() []byte {
	a := audiotest.DBFS(-23)
	return audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 2, 997, a, 0.9*a))
}

func writeTestFile(t *testing.T, dir, rel string, data []byte) string {
	t.Helper()
	path := filepath.Join(dir, rel)
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func readTestFile(t *testing.T, path string) []byte {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// kweighWithin is kweigh with a deadline: a run that blocks (on a FIFO,
// say) fails the test instead of hanging it.
func kweighWithin(t *testing.T, limit time.Duration, args ...string) (int, string, string) {
	t.Helper()
	type outcome struct {
		code        int
		out, errOut string
	}
	done := make(chan outcome, 1)
	go func() {
		var out, errOut bytes.Buffer
		code := run(context.Background(), append([]string{"kweigh"}, args...), &out, &errOut)
		done <- outcome{code, out.String(), errOut.String()}
	}()
	select {
	case o := <-done:
		return o.code, o.out, o.errOut
	case <-time.After(limit):
		t.Fatalf("kweigh %v did not finish within %v", args, limit)
		return 0, "", ""
	}
}

// TestDamagedDeliveriesAreErrors: files named like audio that cannot be
// read are broken deliveries (issue 8): errors in the results, the summary
// and the exit status, listed in JUnit; a cue sheet is still skipped.
func TestDamagedDeliveriesAreErrors(t *testing.T) {
	dir := t.TempDir()
	writeTestFile(t, dir, "good.wav", lineUpWAV())
	zeroed := lineUpWAV()
	copy(zeroed, "\x00\x00\x00\x00") // the RIFF magic zeroed
	writeTestFile(t, dir, "zeroed-magic.wav", zeroed)
	noise := make([]byte, 4096)
	rand.New(rand.NewSource(8)).Read(noise)
	writeTestFile(t, dir, "random-bytes.WAV", noise)
	mp3 := readTestFile(t, filepath.Join(demoDir, "northgate-podcasts", "lamplighters-almanac-s02e12.mp3"))
	writeTestFile(t, dir, "behind-zeros.mp3", append(make([]byte, 5000), mp3...))
	// An ID3v2.4 header (id3.org, ID3v2.4.0 structure, section 3.1) whose
	// synchsafe size, 0x7f7f7f7f = 256 MiB, runs far past the end.
	flac := readTestFile(t, filepath.Join(demoDir, "quillbrook-stream", "quayside-sessions-ep03.flac"))
	writeTestFile(t, dir, "big-tag.flac", append([]byte("ID3\x04\x00\x00\x7f\x7f\x7f\x7f"), flac...))
	writeTestFile(t, dir, "cue-sheet.txt", []byte("00:00 opening theme\n"))
	junit := filepath.Join(dir, "out", "results.xml")
	os.Mkdir(filepath.Dir(junit), 0o755)

	code, out, errOut := kweighWithin(t, time.Minute, "check", "--spec", "ebu-r128", "--format", "junit", "--output", junit, dir)
	if code != exitTrouble {
		t.Errorf("exit %d, want %d\n%s\n%s", code, exitTrouble, out, errOut)
	}
	if !strings.Contains(errOut, "cue-sheet.txt") {
		t.Errorf("the cue sheet should be skipped with a note; stderr: %s", errOut)
	}
	var suites struct {
		Errors int `xml:"errors,attr"`
		Suites []struct {
			Cases []struct {
				ClassName string    `xml:"classname,attr"`
				Error     *struct{} `xml:"error"`
			} `xml:"testcase"`
		} `xml:"testsuite"`
	}
	if err := xml.Unmarshal(readTestFile(t, junit), &suites); err != nil {
		t.Fatal(err)
	}
	errored := map[string]bool{}
	listed := map[string]bool{}
	for _, s := range suites.Suites {
		for _, c := range s.Cases {
			listed[filepath.Base(c.ClassName)] = true
			if c.Error != nil {
				errored[filepath.Base(c.ClassName)] = true
			}
		}
	}
	for _, name := range []string{"zeroed-magic.wav", "random-bytes.WAV", "behind-zeros.mp3", "big-tag.flac"} {
		if !listed[name] {
			t.Errorf("%s missing from JUnit (listed: %v)", name, listed)
		}
	}
	for _, name := range []string{"zeroed-magic.wav", "random-bytes.WAV"} {
		if !errored[name] {
			t.Errorf("%s should be a JUnit <error>", name)
		}
	}
	if listed["cue-sheet.txt"] || !listed["good.wav"] || errored["good.wav"] {
		t.Errorf("JUnit lists %v, errors %v: want good.wav passing and no cue sheet", listed, errored)
	}
	// The text summary on stdout counts them.
	if !strings.Contains(out, "errors") || strings.Contains(out, " 0 errors") {
		t.Errorf("summary should count the errors:\n%s", out)
	}
}

// TestNamesTakenLiterally: a name that exists is a file, not a pattern;
// only a name that does not exist is globbed (issue 8).
func TestNamesTakenLiterally(t *testing.T) {
	dir := t.TempDir()
	quiet := audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 1, 997, 0.01, 0.01))
	writeTestFile(t, dir, "ep[1].wav", lineUpWAV())
	writeTestFile(t, dir, "ep1.wav", quiet)
	writeTestFile(t, dir, "take [1].wav", lineUpWAV())
	paths := func(args ...string) []string {
		t.Helper()
		code, out, errOut := kweigh(t, append([]string{"measure", "--format", "json"}, args...)...)
		if code != exitOK {
			t.Fatalf("measure %v: exit %d: %s", args, code, errOut)
		}
		var doc struct {
			Files []struct{ Path string } `json:"files"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		var got []string
		for _, f := range doc.Files {
			got = append(got, filepath.Base(f.Path))
		}
		return got
	}
	for _, tc := range []struct{ arg, want string }{
		{"ep[1].wav", "ep[1].wav"},
		{"take [1].wav", "take [1].wav"},
		{"ep[2-9x1].wav", "ep1.wav"}, // does not exist: a pattern
	} {
		if got := paths(filepath.Join(dir, tc.arg)); len(got) != 1 || got[0] != tc.want {
			t.Errorf("%s measured %v, want [%s]", tc.arg, got, tc.want)
		}
	}
}

// TestFIFOsNeverBlock: a FIFO found in a folder, named as kweigh.toml or
// given to --spec is "not a regular file" at once (issue 8).
func TestFIFOsNeverBlock(t *testing.T) {
	dir := t.TempDir()
	writeTestFile(t, dir, "delivery/good.wav", lineUpWAV())
	if err := syscall.Mkfifo(filepath.Join(dir, "delivery", "live.wav"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ := kweighWithin(t, 20*time.Second, "measure", filepath.Join(dir, "delivery"))
	if code != exitTrouble || !strings.Contains(out, "live.wav") || !strings.Contains(out, "not a regular file") {
		t.Errorf("FIFO in a folder: exit %d\n%s", code, out)
	}
	writeTestFile(t, dir, "fifo-spec/good.wav", lineUpWAV())
	if err := syscall.Mkfifo(filepath.Join(dir, "fifo-spec", "kweigh.toml"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ = kweighWithin(t, 20*time.Second, "check", filepath.Join(dir, "fifo-spec"))
	if code != exitTrouble || !strings.Contains(out, "not a regular file") {
		t.Errorf("FIFO as kweigh.toml: exit %d\n%s", code, out)
	}
	// A device named on the command line or as --spec (issue 8: /dev/zero
	// was "file is empty", and as a spec grew without bound).
	if _, err := os.Stat("/dev/zero"); err == nil {
		code, out, _ = kweighWithin(t, 20*time.Second, "measure", "/dev/zero")
		if code != exitTrouble || !strings.Contains(out, "not a regular file") {
			t.Errorf("measure /dev/zero: exit %d\n%s", code, out)
		}
		code, _, errOut := kweighWithin(t, 20*time.Second, "check", "--spec", "/dev/zero", filepath.Join(dir, "delivery", "good.wav"))
		if code != exitTrouble || !strings.Contains(errOut, "not a regular file") {
			t.Errorf("--spec /dev/zero: exit %d, stderr %q", code, errOut)
		}
	}
	fifo := filepath.Join(dir, "house.toml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errOut := kweighWithin(t, 20*time.Second, "check", "--spec", fifo, filepath.Join(dir, "delivery", "good.wav"))
	if code != exitTrouble || !strings.Contains(errOut, "not a regular file") {
		t.Errorf("--spec FIFO: exit %d, stderr %q", code, errOut)
	}
}

// TestOutputsCheckedFirst: an output naming an input is refused before
// anything is opened; an output that cannot be created fails at once,
// before any file is measured (issue 8).
func TestOutputsCheckedFirst(t *testing.T) {
	dir := t.TempDir()
	input := writeTestFile(t, dir, "ep07.wav", lineUpWAV())
	before := readTestFile(t, input)
	// The same file under another name.
	alias := filepath.Join(dir, ".", "sub", "..", "ep07.wav")
	os.Mkdir(filepath.Join(dir, "sub"), 0o755)
	for _, flag := range []string{"--output", "--report"} {
		code, out, errOut := kweigh(t, "measure", "--format", "json", flag, alias, dir)
		if code != exitTrouble || !strings.Contains(errOut, "is the input file") || out != "" {
			t.Errorf("%s = input: exit %d, stdout %q, stderr %q", flag, code, out, errOut)
		}
		if !bytes.Equal(readTestFile(t, input), before) {
			t.Fatalf("%s = input: the input file was changed", flag)
		}
	}
	// A path below a regular file can never be created.
	blocked := filepath.Join(input, "qc.html")
	for _, flag := range []string{"--output", "--report", "--plots"} {
		code, out, errOut := kweigh(t, "measure", flag, blocked, dir)
		if code != exitTrouble || !strings.Contains(errOut, flag) || out != "" {
			t.Errorf("%s uncreatable: exit %d, stdout %q (nothing may be measured), stderr %q", flag, code, out, errOut)
		}
	}
	if leftovers, _ := filepath.Glob(filepath.Join(dir, ".*.part")); len(leftovers) > 0 {
		t.Errorf("temporary files left behind: %v", leftovers)
	}
}

// TestPlotNames: unique for paths that used to collide, short for any
// path, readable (issue 8).
func TestPlotNames(t *testing.T) {
	long := strings.Repeat("very-long-folder-name/", 12) + strings.Repeat("x", 120) + ".wav"
	names := map[string]string{}
	for _, p := range []string{"a/b.wav", "a__b.wav", "a/b.flac", "../a/b.wav", long, "evil\x1b.wav"} {
		n := plotName(p)
		if other, dup := names[n]; dup {
			t.Errorf("%q and %q share the plot name %s", p, other, n)
		}
		names[n] = p
		if len(n) > 100 || strings.ContainsAny(n, "/\\\x1b") || !strings.HasSuffix(n, ".svg") {
			t.Errorf("plot name %q for %q: want a short, safe .svg name", n, p)
		}
	}
	if n := plotName("show/tidewater-evenings-ep07.wav"); !strings.HasPrefix(n, "tidewater-evenings-ep07-") {
		t.Errorf("plot name %q should start with the file's own name", n)
	}
	// End to end: a/b.wav and a__b.wav get a plot each.
	dir := t.TempDir()
	writeTestFile(t, dir, "a/b.wav", lineUpWAV())
	writeTestFile(t, dir, "a__b.wav", lineUpWAV())
	plots := filepath.Join(dir, "plots")
	if code, _, errOut := kweigh(t, "measure", "--plots", plots, filepath.Join(dir, "a"), filepath.Join(dir, "a__b.wav")); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if svgs, _ := filepath.Glob(filepath.Join(plots, "*.svg")); len(svgs) != 2 {
		t.Errorf("%d plots, want 2: %v", len(svgs), svgs)
	}
}

// TestCheckDotFindsParentSpec: `check .` inside a delivery folder finds the
// spec of the folder above (issue 8, issue 9).
func TestCheckDotFindsParentSpec(t *testing.T) {
	dir := t.TempDir()
	writeTestFile(t, dir, "kweigh.toml", []byte("name = \"saltmarsh-fm\"\nextends = \"ebu-r128\"\n"))
	writeTestFile(t, dir, "week1/ep1.wav", lineUpWAV())
	t.Chdir(filepath.Join(dir, "week1"))
	code, out, errOut := kweigh(t, "check", "--format", "json", ".")
	var doc checkDoc
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("exit %d, %v: %s", code, err, errOut)
	}
	if len(doc.Files) != 1 || doc.Files[0].Spec != "saltmarsh-fm" {
		t.Errorf("check . judged %+v, want ep1.wav by saltmarsh-fm", doc.Files)
	}
}

// TestSpecSearchUpwards: the three ways of naming files below an outlet
// folder all find the outlet's spec (issue 9).
func TestSpecSearchUpwards(t *testing.T) {
	dir := t.TempDir()
	writeTestFile(t, dir, "outlet/kweigh.toml", []byte("name = \"saltmarsh-fm\"\nextends = \"ebu-r128\"\n"))
	writeTestFile(t, dir, "outlet/week1/x.wav", lineUpWAV())
	t.Chdir(dir)
	for _, arg := range []string{"outlet/week1/x.wav", "outlet/week1", "outlet/*/*.wav"} {
		code, out, errOut := kweigh(t, "check", "--format", "json", arg)
		var doc checkDoc
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatalf("%s: exit %d, %v: %s", arg, code, err, errOut)
		}
		if len(doc.Files) != 1 || doc.Files[0].Spec != "saltmarsh-fm" {
			t.Errorf("%s: judged %+v, want x.wav by saltmarsh-fm", arg, doc.Files)
		}
	}
}

// TestMixedFolderConcurrent runs check on four workers over a folder of
// every kind of entry (WAV, FLAC, MP3, a damaged WAV, a cue sheet, a FIFO,
// a sub-folder with its own spec); .ci/run runs it under the race
// detector. Every audio entry is reported once, in folder order.
func TestMixedFolderConcurrent(t *testing.T) {
	dir := t.TempDir()
	writeTestFile(t, dir, "kweigh.toml", []byte("name = \"saltmarsh-fm\"\nextends = \"ebu-r128\"\n"))
	writeTestFile(t, dir, "a-tone.wav", lineUpWAV())
	writeTestFile(t, dir, "b-music.flac", readTestFile(t, filepath.Join(demoDir, "quillbrook-stream", "quayside-sessions-ep03.flac")))
	writeTestFile(t, dir, "c-talk.mp3", readTestFile(t, filepath.Join(demoDir, "northgate-podcasts", "lamplighters-almanac-s02e12.mp3")))
	writeTestFile(t, dir, "d-cut.wav", lineUpWAV()[:30])
	writeTestFile(t, dir, "e-notes.txt", []byte("running order\n"))
	if err := syscall.Mkfifo(filepath.Join(dir, "f-pipe.wav"), 0o644); err != nil {
		t.Fatal(err)
	}
	writeTestFile(t, dir, "g-podcast/kweigh.toml", []byte("name = \"reedbank-audio\"\nextends = \"podcast\"\n"))
	writeTestFile(t, dir, "g-podcast/h-episode.wav", lineUpWAV())
	code, out, errOut := kweighWithin(t, time.Minute, "check", "--jobs", "4", "--format", "json", dir)
	if code != exitTrouble {
		t.Errorf("exit %d, want %d (a cut WAV and a FIFO): %s", code, exitTrouble, errOut)
	}
	var doc checkDoc
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	want := []struct{ name, spec, verdict string }{
		{"a-tone.wav", "saltmarsh-fm", ""},
		{"b-music.flac", "saltmarsh-fm", ""},
		{"c-talk.mp3", "saltmarsh-fm", ""},
		{"d-cut.wav", "saltmarsh-fm", "error"},
		{"f-pipe.wav", "saltmarsh-fm", "error"},
		{"h-episode.wav", "reedbank-audio", ""},
	}
	if len(doc.Files) != len(want) {
		t.Fatalf("%d files reported, want %d: %+v", len(doc.Files), len(want), doc.Files)
	}
	for i, w := range want {
		f := doc.Files[i]
		if filepath.Base(f.Path) != w.name || w.verdict != "" && f.Verdict != w.verdict || w.verdict == "" && f.Verdict == "error" {
			t.Errorf("file %d: %s %s %s (%s), want %s by %s, verdict %q", i, f.Path, f.Spec, f.Verdict, f.Error, w.name, w.spec, w.verdict)
		}
		if w.spec != "none" && f.Spec != w.spec {
			t.Errorf("%s judged by %s, want %s", w.name, f.Spec, w.spec)
		}
	}
}
