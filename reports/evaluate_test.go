package reports

import (
	"bytes"
	"encoding/xml"
	"testing"

	"github.com/kweigh/kweigh/rules"
)

// TestRealEvaluations writes what rules.Evaluate really produces, for every
// built-in spec and every test measurement, in every check format, and reads
// the machine formats back: the writers must handle whatever the rules
// emit (units, string and number measurements, error files).
func TestRealEvaluations(t *testing.T) {
	for _, spec := range rules.Builtin() {
		var results []*rules.Result
		var summary Summary
		for _, m := range testMeasurements() {
			r := rules.Evaluate(spec, m)
			results = append(results, &r)
			summary.Add(&r)
		}
		for _, f := range CheckFormats() {
			var b bytes.Buffer
			w, err := NewCheckWriter(&b, f, Options{Spec: spec.ID})
			if err != nil {
				t.Fatal(err)
			}
			for _, r := range results {
				if err := w.Write(r); err != nil {
					t.Fatalf("%s %s: Write(%s): %v", spec.ID, f, r.Path, err)
				}
			}
			if err := w.Close(summary); err != nil {
				t.Fatalf("%s %s: Close: %v", spec.ID, f, err)
			}
			switch f {
			case JSON:
				if got := len(files(t, decodeDocument(t, b.Bytes()))); got != len(results) {
					t.Errorf("%s json: %d files, want %d", spec.ID, got, len(results))
				}
			case JSONL:
				if got := len(decodeLines(t, b.Bytes())); got != len(results) {
					t.Errorf("%s jsonl: %d lines, want %d", spec.ID, got, len(results))
				}
			case CSV:
				if _, rows := readCSV(t, b.Bytes()); len(rows) != len(results) {
					t.Errorf("%s csv: %d rows, want %d", spec.ID, len(rows), len(results))
				}
			case JUnit:
				var doc parsedSuites
				if err := xml.Unmarshal(b.Bytes(), &doc); err != nil {
					t.Fatalf("%s junit: %v", spec.ID, err)
				}
				tests, failures, errs := expectedCounts(results, false)
				if doc.Tests != tests || doc.Failures != failures || doc.Errors != errs {
					t.Errorf("%s junit: %d/%d/%d, want %d/%d/%d", spec.ID, doc.Tests, doc.Failures, doc.Errors, tests, failures, errs)
				}
			}
		}
	}
}
