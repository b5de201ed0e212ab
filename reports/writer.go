package reports

import (
	"io"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// MeasureWriter writes a `kweigh measure` report one file at a time.
type MeasureWriter interface {
	// Write adds one file's measurement. The error, if any, is the writer's
	// first error; it is kept and returned again by Close.
	Write(m *measure.Measurement) error
	// Close ends the report with the run's summary, flushes it and returns
	// the first error met by any Write or by Close itself. It does not close
	// the underlying io.Writer.
	Close(s Summary) error
}

// CheckWriter writes a `kweigh check` report one file at a time.
type CheckWriter interface {
	// Write adds one file's result. The error, if any, is the writer's first
	// error; it is kept and returned again by Close.
	Write(r *rules.Result) error
	// Close ends the report with the run's summary, flushes it and returns
	// the first error met by any Write or by Close itself. It does not close
	// the underlying io.Writer.
	Close(s Summary) error
}

// NewMeasureWriter returns a writer of measurements in format f (text,
// json, jsonl or csv) on w.
func NewMeasureWriter(w io.Writer, f Format, opts Options) (MeasureWriter, error) {
	switch f {
	case Text:
		return newMeasureText(w, opts), nil
	case JSON:
		return &measureJSON{doc: newJSONDocument(w, opts, false)}, nil
	case JSONL:
		return &measureJSONL{lines: newJSONLines(w)}, nil
	case CSV:
		return newMeasureCSV(w), nil
	}
	return nil, &UnknownFormatError{Name: string(f), Allowed: MeasureFormats()}
}

// NewCheckWriter returns a writer of check results in format f (text, json,
// jsonl, csv or junit) on w.
func NewCheckWriter(w io.Writer, f Format, opts Options) (CheckWriter, error) {
	switch f {
	case Text:
		return newCheckText(w, opts), nil
	case JSON:
		return &checkJSON{doc: newJSONDocument(w, opts, true)}, nil
	case JSONL:
		return &checkJSONL{lines: newJSONLines(w)}, nil
	case CSV:
		return newCheckCSV(w), nil
	case JUnit:
		return newCheckJUnit(w, opts), nil
	}
	return nil, &UnknownFormatError{Name: string(f), Allowed: CheckFormats()}
}
