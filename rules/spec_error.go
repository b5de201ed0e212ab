package rules

import (
	"fmt"
	"strings"
)

// SpecError is a problem in a user spec file: a TOML syntax error, an
// unknown key or a bad value.
type SpecError struct {
	File    string // the file name given to Parse or LoadFile
	Line    int    // 1-based; 0 when not known
	Key     string // dotted key, e.g. "loudness.tolerance_lu"; empty for syntax errors without one
	Problem string
}

// Error writes "file:line: key: problem".
func (e *SpecError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	b.WriteString(": ")
	if e.Key != "" {
		b.WriteString(e.Key + ": ")
	}
	b.WriteString(e.Problem)
	return b.String()
}

// SpecErrors is every problem found in one spec file, in line order. It
// unwraps to its *SpecError elements, so errors.As finds the first.
type SpecErrors []*SpecError

// Error writes one problem per line.
func (es SpecErrors) Error() string {
	lines := make([]string, len(es))
	for i, e := range es {
		lines[i] = e.Error()
	}
	return strings.Join(lines, "\n")
}

// Unwrap returns the individual errors.
func (es SpecErrors) Unwrap() []error {
	errs := make([]error, len(es))
	for i, e := range es {
		errs[i] = e
	}
	return errs
}
