package reports

import (
	"fmt"
	"strings"
)

// Format names a report format as given to --format.
type Format string

// The report formats.
const (
	Text  Format = "text"
	JSON  Format = "json"
	JSONL Format = "jsonl"
	CSV   Format = "csv"
	JUnit Format = "junit"
)

// CheckFormats returns the formats `kweigh check` can write, default first.
func CheckFormats() []Format { return []Format{Text, JSON, JSONL, CSV, JUnit} }

// MeasureFormats returns the formats `kweigh measure` can write, default
// first. JUnit is not among them: a measurement has no pass or fail.
func MeasureFormats() []Format { return []Format{Text, JSON, JSONL, CSV} }

// UnknownFormatError is returned by ParseFormat for a name that is not a
// format, and by the constructors for a format they cannot write.
type UnknownFormatError struct {
	Name string
	// Allowed lists the formats that would have been accepted.
	Allowed []Format
}

// Error names the format given and lists the ones allowed.
func (e *UnknownFormatError) Error() string {
	names := make([]string, len(e.Allowed))
	for i, f := range e.Allowed {
		names[i] = string(f)
	}
	return fmt.Sprintf("unknown report format %q (use one of: %s)", e.Name, strings.Join(names, ", "))
}

// ParseFormat returns the Format named s (case and surrounding space
// ignored): text, json, jsonl, csv or junit.
func ParseFormat(s string) (Format, error) {
	f := Format(strings.ToLower(strings.TrimSpace(s)))
	for _, known := range CheckFormats() {
		if f == known {
			return f, nil
		}
	}
	return "", &UnknownFormatError{Name: s, Allowed: CheckFormats()}
}

// Streaming reports whether records in this format are meant to be written
// as each file finishes. Only JSONL is; the other formats are documents whose
// records the caller should sort (SortResults, SortMeasurements) first.
func (f Format) Streaming() bool { return f == JSONL }

// String returns the format's name.
func (f Format) String() string { return string(f) }
