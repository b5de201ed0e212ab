package reports

import (
	"strconv"
	"strings"
	"unicode"
)

// Printable returns s with control characters (C0, DEL, C1 and other
// non-printing runes, and invalid UTF-8) written as Go escapes such as
// \x1b or \n, for text meant for a terminal. A file name is chosen by
// whoever delivered the file: raw escape sequences in it could rewrite the
// terminal or forge a verdict line. Machine formats (JSON, CSV, XML) carry
// the name exactly, under their own escaping.
func Printable(s string) string {
	clean := true
	for _, r := range s {
		if r == unicode.ReplacementChar || !unicode.IsPrint(r) && r != ' ' {
			clean = false
			break
		}
	}
	if clean {
		return s
	}
	var b strings.Builder
	for i, r := range s {
		switch {
		case r == unicode.ReplacementChar && strings.HasPrefix(s[i:], "\uFFFD"):
			b.WriteRune(r)
		case r == unicode.ReplacementChar:
			b.WriteString(`\x` + strconv.FormatUint(uint64(s[i]), 16))
		case unicode.IsPrint(r) || r == ' ':
			b.WriteRune(r)
		default:
			q := strconv.QuoteRune(r)
			b.WriteString(q[1 : len(q)-1])
		}
	}
	return b.String()
}
