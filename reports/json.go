package reports

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"time"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// jsonDocument streams one indented JSON document:
//
//	{"tool", "version", "generated", ["spec",] "files": [...], "summary"}
//
// The head is written with the first record (or at Close), each record as it
// comes, and the summary at Close, so memory does not grow with the run.
type jsonDocument struct {
	sink
	opts     Options
	withSpec bool
	started  bool
	records  int
}

func newJSONDocument(w io.Writer, opts Options, withSpec bool) *jsonDocument {
	return &jsonDocument{sink: newSink(w, JSON), opts: opts, withSpec: withSpec}
}

func (d *jsonDocument) start() {
	if d.started {
		return
	}
	d.started = true
	d.print("{\n")
	d.member("tool", "kweigh")
	d.member("version", d.opts.version())
	d.member("generated", d.opts.generated().Format(time.RFC3339))
	// The run's spec, when one was named for every file; with per-folder
	// specs each file object carries its own.
	if d.withSpec && d.opts.Spec != "" {
		d.member("spec", d.opts.Spec)
	}
	d.print(`  "files": [`)
}

// member writes one string member of the head.
func (d *jsonDocument) member(key, value string) {
	v, _ := json.Marshal(value) // a string always encodes
	d.printf("  %q: %s,\n", key, v)
}

// record adds one element to "files"; path names the file in an encoding
// error.
func (d *jsonDocument) record(v any, path string) error {
	if err := d.ready(); err != nil {
		return err
	}
	d.start()
	data, err := encodeJSON(v, "    ", "  ")
	if err != nil {
		return d.fail(fmt.Errorf("%s: %w", path, err))
	}
	if d.records > 0 {
		d.print(",")
	}
	d.print("\n    ")
	d.write(data)
	d.records++
	return d.err
}

// finish writes the summary and the end of the document.
func (d *jsonDocument) finish(summary any) error {
	if d.closed {
		return ErrClosed
	}
	if d.err == nil {
		d.start()
		if d.records > 0 {
			d.print("\n  ")
		}
		d.print("],\n")
		data, err := encodeJSON(summary, "  ", "  ")
		if err != nil {
			d.fail(fmt.Errorf("summary: %w", err))
		}
		d.print(`  "summary": `)
		d.write(data)
		d.print("\n}\n")
	}
	return d.close()
}

// audioSeconds rounds the summed duration to the millisecond, hiding the
// float noise of the sum.
func audioSeconds(s Summary) float64 { return math.Round(s.AudioSeconds*1000) / 1000 }

// elapsedSeconds is the summary's wall time, null when unknown.
func elapsedSeconds(s Summary) *float64 {
	if s.Elapsed <= 0 {
		return nil
	}
	e := s.Elapsed.Seconds()
	return &e
}

// measureSummaryJSON is the "summary" member of a measure document.
type measureSummaryJSON struct {
	Files        int      `json:"files"`
	Measured     int      `json:"measured"`
	Damaged      int      `json:"damaged"`
	Undeclared   int      `json:"undeclared,omitempty"`
	Errors       int      `json:"errors"`
	AudioSeconds float64  `json:"audio_s"`
	Elapsed      *float64 `json:"elapsed_s"`
	Interrupted  bool     `json:"interrupted,omitempty"`
	Unfinished   int      `json:"unfinished,omitempty"`
}

// checkSummaryJSON is the "summary" member of a check document.
type checkSummaryJSON struct {
	Files        int      `json:"files"`
	Passed       int      `json:"passed"`
	Warned       int      `json:"warned"`
	Failed       int      `json:"failed"`
	Errors       int      `json:"errors"`
	AudioSeconds float64  `json:"audio_s"`
	Elapsed      *float64 `json:"elapsed_s"`
	Interrupted  bool     `json:"interrupted,omitempty"`
	Unfinished   int      `json:"unfinished,omitempty"`
}

// measureJSON writes measurements as one JSON document.
type measureJSON struct{ doc *jsonDocument }

func (w *measureJSON) Write(m *measure.Measurement) error {
	if m == nil {
		return w.doc.fail(errNilRecord)
	}
	return w.doc.record(m, measurementPath(m))
}

func (w *measureJSON) Close(s Summary) error {
	return w.doc.finish(measureSummaryJSON{
		Files: s.Files, Measured: s.Measured(), Damaged: s.Damaged, Undeclared: s.Undeclared, Errors: s.Errors,
		AudioSeconds: audioSeconds(s), Elapsed: elapsedSeconds(s),
		Interrupted: s.Interrupted, Unfinished: s.Unfinished,
	})
}

// checkJSON writes check results as one JSON document.
type checkJSON struct{ doc *jsonDocument }

func (w *checkJSON) Write(r *rules.Result) error {
	if r == nil {
		return w.doc.fail(errNilRecord)
	}
	return w.doc.record(r, measurementPath(r.Measurement))
}

func (w *checkJSON) Close(s Summary) error {
	return w.doc.finish(checkSummaryJSON{
		Files: s.Files, Passed: s.Passed, Warned: s.Warned, Failed: s.Failed, Errors: s.Errors,
		AudioSeconds: audioSeconds(s), Elapsed: elapsedSeconds(s),
		Interrupted: s.Interrupted, Unfinished: s.Unfinished,
	})
}
