package reports

import (
	"fmt"
	"io"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// jsonLines writes one compact JSON object per line and flushes after each,
// so a reader sees every file as soon as it finishes.
type jsonLines struct{ sink }

func newJSONLines(w io.Writer) *jsonLines { return &jsonLines{sink: newSink(w, JSONL)} }

func (l *jsonLines) line(v any, path string) error {
	if err := l.ready(); err != nil {
		return err
	}
	data, err := encodeJSON(v, "", "")
	if err != nil {
		return l.fail(fmt.Errorf("%s: %w", path, err))
	}
	l.write(data)
	l.print("\n")
	return l.flush()
}

// measureJSONL writes one measurement per line.
type measureJSONL struct{ lines *jsonLines }

func (w *measureJSONL) Write(m *measure.Measurement) error {
	if m == nil {
		return w.lines.fail(errNilRecord)
	}
	return w.lines.line(m, measurementPath(m))
}

// Close flushes. A complete run has no summary line; an interrupted one
// ends with {"summary": {..., "interrupted": true}} so that a reader of the
// stream knows files are missing.
func (w *measureJSONL) Close(s Summary) error {
	if s.Interrupted {
		w.lines.line(map[string]any{"summary": measureSummaryJSON{
			Files: s.Files, Measured: s.Measured(), Damaged: s.Damaged, Undeclared: s.Undeclared, Errors: s.Errors,
			AudioSeconds: audioSeconds(s), Elapsed: elapsedSeconds(s), Interrupted: true, Unfinished: s.Unfinished,
		}}, "summary")
	}
	return w.lines.close()
}

// checkJSONL writes one result per line.
type checkJSONL struct{ lines *jsonLines }

func (w *checkJSONL) Write(r *rules.Result) error {
	if r == nil {
		return w.lines.fail(errNilRecord)
	}
	return w.lines.line(r, measurementPath(r.Measurement))
}

// Close flushes; an interrupted run ends with a summary line (see
// measureJSONL.Close).
func (w *checkJSONL) Close(s Summary) error {
	if s.Interrupted {
		w.lines.line(map[string]any{"summary": checkSummaryJSON{
			Files: s.Files, Passed: s.Passed, Warned: s.Warned, Failed: s.Failed, Errors: s.Errors,
			AudioSeconds: audioSeconds(s), Elapsed: elapsedSeconds(s), Interrupted: true, Unfinished: s.Unfinished,
		}}, "summary")
	}
	return w.lines.close()
}
