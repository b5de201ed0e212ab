package reports

import (
	"strings"

	"github.com/kweigh/kweigh/rules"
)

// verdictSymbol is the symbol printed beside a verdict's word. The word is
// always printed too: colour and symbol only add to it.
func verdictSymbol(v rules.Verdict) string {
	switch v {
	case rules.Pass:
		return "✓"
	case rules.Warn:
		return "!"
	case rules.Fail:
		return "✗"
	}
	return "⊘"
}

// verdictWord is the verdict spelled out in capitals: PASS, WARN, FAIL,
// ERROR.
func verdictWord(v rules.Verdict) string {
	if v == "" {
		return "ERROR"
	}
	return strings.ToUpper(string(v))
}

// ANSI SGR sequences for the verdict colours.
const (
	ansiReset   = "\x1b[0m"
	ansiGreen   = "\x1b[32m"
	ansiYellow  = "\x1b[33m"
	ansiRed     = "\x1b[1;31m"
	ansiMagenta = "\x1b[1;35m"
)

// paint wraps s in v's colour when colour is on.
func paint(on bool, v rules.Verdict, s string) string {
	if !on {
		return s
	}
	colour := ansiMagenta
	switch v {
	case rules.Pass:
		colour = ansiGreen
	case rules.Warn:
		colour = ansiYellow
	case rules.Fail:
		colour = ansiRed
	}
	return colour + s + ansiReset
}

// fileVerdict is the verdict a report shows for r: Error when it has no
// measurement or the measurement failed, whatever the rules said.
func fileVerdict(r *rules.Result) rules.Verdict {
	if r.Measurement == nil || r.Measurement.Error != "" || r.Verdict == "" {
		return rules.Error
	}
	return r.Verdict
}
