package reports

import (
	"bytes"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// TestPrintable: control characters become Go escapes (the escape forms of
// the Go specification, "Rune literals"); printable text, spaces and
// non-ASCII letters stay.
func TestPrintable(t *testing.T) {
	tests := []struct{ in, want string }{
		{"ep07.wav", "ep07.wav"},
		{"take 1 – Überspiel.wav", "take 1 – Überspiel.wav"},
		{"evil\x1b[2J.wav", `evil\x1b[2J.wav`},
		{"two\nlines.wav", `two\nlines.wav`},
		{"tab\there", `tab\there`},
		{"bell\a.wav", `bell\a.wav`},
		{"del\x7f.wav", `del\x7f.wav`},
		{"c1\u009b31m.wav", `c1\u009b31m.wav`},
		{"bad\xffutf8.wav", `bad\xffutf8.wav`},
		{"real \uFFFD stays", "real \uFFFD stays"},
	}
	for _, tc := range tests {
		if got := Printable(tc.in); got != tc.want {
			t.Errorf("Printable(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

// TestTextEscapesFileNames: a delivered file name cannot put raw escape
// sequences on the terminal through either text report.
func TestTextEscapesFileNames(t *testing.T) {
	name := "promo\x1b]0;owned\a\x1b[2J.wav"
	m := &measure.Measurement{Path: name, Error: name + ": not a recognised audio file", Notes: []string{}}
	var buf bytes.Buffer
	mw, _ := NewMeasureWriter(&buf, Text, Options{})
	mw.Write(m)
	mw.Close(Summary{Files: 1, Errors: 1})
	r := rules.Evaluate(&rules.Spec{ID: "ebu-r128"}, m)
	cw, _ := NewCheckWriter(&buf, Text, Options{})
	cw.Write(&r)
	cw.Close(Summary{Files: 1, Errors: 1})
	out := buf.String()
	if strings.ContainsAny(out, "\x1b\a") {
		t.Errorf("raw control characters in text output:\n%q", out)
	}
	if !strings.Contains(out, `promo\x1b]0;owned\a\x1b[2J.wav`) {
		t.Errorf("escaped name missing:\n%s", out)
	}
}
