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

// Close flushes; JSON Lines has no summary line.
func (w *measureJSONL) Close(Summary) error { return w.lines.close() }

// checkJSONL writes one result per line.
type checkJSONL struct{ lines *jsonLines }

func (w *checkJSONL) Write(r *rules.Result) error {
	if r == nil {
		return w.lines.fail(errNilRecord)
	}
	return w.lines.line(r, measurementPath(r.Measurement))
}

// Close flushes; JSON Lines has no summary line.
func (w *checkJSONL) Close(Summary) error { return w.lines.close() }
