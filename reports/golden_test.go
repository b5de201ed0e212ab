package reports

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// renderMeasure writes the test measurements in format f.
func renderMeasure(t *testing.T, f Format, opts Options) []byte {
	t.Helper()
	var b bytes.Buffer
	w, err := NewMeasureWriter(&b, f, opts)
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range testMeasurements() {
		if err := w.Write(m); err != nil {
			t.Fatalf("Write(%s): %v", m.Path, err)
		}
	}
	if err := w.Close(testMeasureSummary()); err != nil {
		t.Fatalf("Close: %v", err)
	}
	return b.Bytes()
}

// renderCheck writes the test results in format f.
func renderCheck(t *testing.T, f Format, opts Options) []byte {
	t.Helper()
	var b bytes.Buffer
	w, err := NewCheckWriter(&b, f, opts)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range testResults() {
		if err := w.Write(r); err != nil {
			t.Fatalf("Write(%s): %v", r.Path, err)
		}
	}
	if err := w.Close(testCheckSummary()); err != nil {
		t.Fatalf("Close: %v", err)
	}
	return b.Bytes()
}

// TestGolden compares every format's output with testdata/*.golden;
// `go test ./reports -update` rewrites them after a deliberate change
// (e.g. a field added to measure.Measurement): review the diff.
func TestGolden(t *testing.T) {
	strict := testOptions()
	strict.Strict = true
	colour := testOptions()
	colour.Colour = true
	cases := []struct {
		name   string
		render func(*testing.T) []byte
	}{
		{"measure.text", func(t *testing.T) []byte { return renderMeasure(t, Text, testOptions()) }},
		{"measure.json", func(t *testing.T) []byte { return renderMeasure(t, JSON, testOptions()) }},
		{"measure.jsonl", func(t *testing.T) []byte { return renderMeasure(t, JSONL, testOptions()) }},
		{"measure.csv", func(t *testing.T) []byte { return renderMeasure(t, CSV, testOptions()) }},
		{"check.text", func(t *testing.T) []byte { return renderCheck(t, Text, testOptions()) }},
		{"check.colour.text", func(t *testing.T) []byte { return renderCheck(t, Text, colour) }},
		{"check.json", func(t *testing.T) []byte { return renderCheck(t, JSON, testOptions()) }},
		{"check.jsonl", func(t *testing.T) []byte { return renderCheck(t, JSONL, testOptions()) }},
		{"check.csv", func(t *testing.T) []byte { return renderCheck(t, CSV, testOptions()) }},
		{"check.junit", func(t *testing.T) []byte { return renderCheck(t, JUnit, testOptions()) }},
		{"check.strict.junit", func(t *testing.T) []byte { return renderCheck(t, JUnit, strict) }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := c.render(t)
			path := filepath.Join("testdata", c.name+".golden")
			if *update {
				if err := os.WriteFile(path, got, 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test ./reports -update to create it)", err)
			}
			if !bytes.Equal(got, want) {
				t.Errorf("%s differs from the golden file; if the change is intended, run go test ./reports -update and review the diff\n--- got ---\n%s", path, got)
			}
		})
	}
}
