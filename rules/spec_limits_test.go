package rules

import (
	"errors"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
)

// parseErr parses data as spec file name and returns the single problem.
func parseErr(t *testing.T, name string, data []byte) *SpecError {
	t.Helper()
	s, err := Parse(name, data)
	if err == nil {
		t.Fatalf("%s: accepted as %q, want an error", name, s.ID)
	}
	var all SpecErrors
	if !errors.As(err, &all) || len(all) == 0 || all[0].File != name {
		t.Fatalf("%s: error %v is not SpecErrors naming the file", name, err)
	}
	return all[0]
}

// TestSpecSettingNothingIsAnError: a spec file that sets no limit and
// extends nothing would pass every file; it is an error naming the file.
func TestSpecSettingNothingIsAnError(t *testing.T) {
	for name, doc := range map[string]string{
		"empty.toml":    "",
		"comments.toml": "# Harbourlight Radio, to be filled in\n\n",
		"header.toml":   "name = \"quayside\"\ntitle = \"Quayside Sessions\"\nsource = \"none yet\"\n",
		"tables.toml":   "[loudness]\n[format]\n",
	} {
		e := parseErr(t, name, []byte(doc))
		if !strings.Contains(e.Problem, "sets no limits") || !strings.Contains(e.Error(), name) {
			t.Errorf("%s: %v", name, e)
		}
	}
	for name, doc := range map[string]string{
		"extends.toml": "extends = \"ebu-r128\"\n",
		"one.toml":     "[timing]\nmax_duration_s = 3600\n",
	} {
		if _, err := Parse(name, []byte(doc)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
}

// nested returns "a = {b={b=…1…}}" with n inline tables.
func nested(n int) []byte {
	return []byte("a = " + strings.Repeat("{b=", n) + "1" + strings.Repeat("}", n) + "\n")
}

// TestSpecShapeLimits: deep nesting, long dotted keys and oversized files
// are refused before the TOML library parses them, with little memory (the
// library took seconds and gigabytes on the first case).
func TestSpecShapeLimits(t *testing.T) {
	for _, tc := range []struct {
		name string
		data []byte
		line int
		want string
	}{
		{"inline.toml", nested(8000), 1, "nested more than 8 deep"},
		{"arrays.toml", []byte("[format]\n\nchannels = " + strings.Repeat("[", 9) + strings.Repeat("]", 9)), 3, "nested more than 8 deep"},
		{"dotted.toml", []byte("extends = \"podcast\"\n" + strings.Repeat("a.", 8000) + "b = 1\n"), 2, "more than 8 parts"},
		{"inline-dotted.toml", []byte("x = {" + strings.Repeat("a.", 9) + "b = 1}"), 1, "more than 8 parts"},
		{"header.toml", []byte("[" + strings.Repeat("t.", 20) + "u]\n"), 1, "more than 8 parts"},
		{"big.toml", []byte("extends = \"podcast\"\n" + strings.Repeat("#", MaxSpecBytes)), 0, "larger than 1048576 bytes"},
	} {
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		e := parseErr(t, tc.name, tc.data)
		runtime.ReadMemStats(&after)
		if e.Line != tc.line || !strings.Contains(e.Problem, tc.want) {
			t.Errorf("%s: %v, want line %d and %q", tc.name, e, tc.line, tc.want)
		}
		if got := after.TotalAlloc - before.TotalAlloc; got > 1<<20 {
			t.Errorf("%s: %d bytes allocated to refuse it, want under 1 MiB", tc.name, got)
		}
	}
}

// TestSpecShapeAllowsRealSpecs: brackets, dots and hashes inside strings
// and comments, multi-line strings, table headers and arrays of floats do
// not count as nesting or key parts.
func TestSpecShapeAllowsRealSpecs(t *testing.T) {
	docs := map[string]string{
		"strings.toml": `title = "a.b.c.d.e.f.g.h.i.j [[[[[[[[[[ {{{{{{{{{{ # not a comment"
description = 'x.y.z.a.b.c.d.e.f.g {{{{{{{{{{{{'
source = """
[[[[[[[[[[[[ a.b.c.d.e.f.g.h.i.j ""quoted"" \""" still inside """
extends = "ebu-r128" # {{{{{{{{{{{{ [[[[[[[[[[ a.b.c.d.e.f.g.h.i.j
[loudness] # trailing comment
"max_true_peak_dbtp" = -2.0
[format]
sample_rates_hz = [44100, 48000, 96000]
bit_depths = [16,
  24]
`,
		"literal.toml": "description = '''\n[[[[[[[[[[[ ''\n'''\nextends = \"podcast\"\n[timing]\nmax_duration_s = 1.5e3\n",
	}
	files, err := filepath.Glob("../testdata/demo/*/kweigh.toml")
	if err != nil || len(files) == 0 {
		t.Fatalf("demo specs: %v %v", files, err)
	}
	files = append(files, "testdata/house-spec.toml")
	for _, f := range files {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		docs[f] = string(b)
	}
	for name, doc := range docs {
		if line, problem := checkSpecShape([]byte(doc)); problem != "" {
			t.Errorf("%s:%d: %s", name, line, problem)
		}
		if _, err := Parse(name, []byte(doc)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
}

// TestLoadFileRefusesNonRegular: a device, a FIFO without a writer and a
// folder are refused at once (a FIFO would block forever, /dev/zero would
// grow without end); a regular file over the cap is refused after reading
// only the cap.
func TestLoadFileRefusesNonRegular(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "kweigh.toml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{"/dev/zero", fifo, dir} {
		done := make(chan error, 1)
		go func() {
			_, err := LoadFile(path)
			done <- err
		}()
		select {
		case err := <-done:
			if !errors.Is(err, decode.ErrNotRegular) || !strings.Contains(err.Error(), path) {
				t.Errorf("%s: %v, want a not-a-regular-file error naming it", path, err)
			}
		case <-time.After(10 * time.Second):
			t.Fatalf("%s: LoadFile still blocked after 10 s", path)
		}
	}
	big := filepath.Join(dir, "big.toml")
	if err := os.WriteFile(big, append([]byte("extends = \"podcast\"\n"), make([]byte, 3*MaxSpecBytes)...), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := LoadFile(big)
	if err == nil || !strings.Contains(err.Error(), "big.toml") || !strings.Contains(err.Error(), "larger than") {
		t.Errorf("oversized spec: %v", err)
	}
}
