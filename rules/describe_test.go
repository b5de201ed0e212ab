package rules

import (
	"bytes"
	"flag"
	"os"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite golden files")

// TestDescribeGolden keeps `kweigh specs show` text for every built-in spec
// and the house spec in testdata/describe.golden (regenerate with -update
// after a deliberate change, then review the diff).
func TestDescribeGolden(t *testing.T) {
	var out bytes.Buffer
	specs := Builtin()
	house, err := LoadFile("testdata/house-spec.toml")
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range append(specs, house) {
		if err := s.Describe(&out); err != nil {
			t.Fatal(err)
		}
		out.WriteString("\n")
	}
	const golden = "testdata/describe.golden"
	if *update {
		if err := os.WriteFile(golden, out.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(out.Bytes(), want) {
		t.Errorf("Describe output differs from %s; run go test ./rules/ -run TestDescribeGolden -update and review the diff", golden)
	}
	// Every built-in's description carries the markers of its sources.
	for _, s := range specs {
		var b strings.Builder
		if err := s.Describe(&b); err != nil {
			t.Fatal(err)
		}
		for _, src := range s.LimitSources {
			if !strings.Contains(b.String(), src) {
				t.Errorf("%s: description lacks source %q", s.ID, src)
			}
		}
	}
}

type failingWriter struct{}

func (failingWriter) Write([]byte) (int, error) { return 0, os.ErrClosed }

func TestDescribeWriteError(t *testing.T) {
	if err := mustLookup(t, "podcast").Describe(failingWriter{}); err == nil {
		t.Error("Describe ignored a write error")
	}
}
