package rules

import "fmt"

// Limits on a spec file, checked before the TOML library sees it. A kweigh
// spec is a few hundred bytes of tables one level deep; the library's time
// and memory grow faster than linearly with the nesting of inline tables
// and the length of dotted keys (8000 nested inline tables in 48 KB took
// seconds and gigabytes), and a spec read from an endless source would
// never end. These bounds are generous for any real spec and keep the
// worst case of the parser to milliseconds.
const (
	// MaxSpecBytes is the largest spec file kweigh reads (1 MiB).
	MaxSpecBytes = 1 << 20
	// maxSpecNesting is the deepest nesting of inline tables and arrays
	// ({ and [) a spec may use; kweigh's own format needs 1.
	maxSpecNesting = 8
	// maxSpecKeyParts is the most parts a dotted key may have (a.b.c is
	// three); kweigh's own format needs 2.
	maxSpecKeyParts = 8
)

// checkSpecShape scans a TOML document without parsing it and returns the
// first problem with its 1-based line: too long, nested too deeply, or a
// key with too many dotted parts. It understands just enough TOML to do so:
// comments, the four kinds of string, table headers, inline tables and
// arrays. Anything else it leaves to the TOML library.
func checkSpecShape(data []byte) (line int, problem string) {
	if len(data) > MaxSpecBytes {
		return 0, fmt.Sprintf("the file is larger than %d bytes (1 MiB); a spec is a few hundred bytes", MaxSpecBytes)
	}
	var stack []byte // open '{' and '['
	line = 1
	atKey := true // the next bare text is a key (start of a line or after '{' / ',' in an inline table)
	header := false
	parts := 1
	for i := 0; i < len(data); i++ {
		c := data[i]
		switch {
		case c == '\n':
			line++
			if len(stack) == 0 {
				atKey, header, parts = true, false, 1
			}
		case c == '#':
			for i < len(data) && data[i] != '\n' {
				i++
			}
			i-- // let the newline be counted
		case c == '"' || c == '\'':
			end, lines := skipString(data, i)
			line += lines
			i = end
		case c == '[' && len(stack) == 0 && atKey:
			header, parts = true, 1 // a table header: [a.b] or [[a.b]]
			if i+1 < len(data) && data[i+1] == '[' {
				i++
			}
		case c == ']' && header:
			header, atKey = false, false
			if i+1 < len(data) && data[i+1] == ']' {
				i++
			}
		case c == '{' || c == '[':
			stack = append(stack, c)
			if len(stack) > maxSpecNesting {
				return line, fmt.Sprintf("inline tables or arrays nested more than %d deep; a kweigh spec needs one level", maxSpecNesting)
			}
			atKey, parts = c == '{', 1
		case c == '}' || c == ']':
			if len(stack) > 0 {
				stack = stack[:len(stack)-1]
			}
			atKey = false
		case c == ',':
			if len(stack) > 0 && stack[len(stack)-1] == '{' {
				atKey, parts = true, 1
			}
		case c == '=' && !header:
			atKey = false
		case c == '.' && (atKey || header):
			parts++
			if parts > maxSpecKeyParts {
				return line, fmt.Sprintf("a dotted key with more than %d parts; a kweigh key has two (table.key)", maxSpecKeyParts)
			}
		}
	}
	return 0, ""
}

// skipString returns the index of the last byte of the string starting at
// data[i] (a quote) and how many newlines it spans. An unterminated string
// runs to the end; the TOML library reports it.
func skipString(data []byte, i int) (end, lines int) {
	q := data[i]
	multi := i+2 < len(data) && data[i+1] == q && data[i+2] == q
	j := i + 1
	if multi {
		j = i + 3
	}
	for ; j < len(data); j++ {
		c := data[j]
		switch {
		case c == '\\' && q == '"':
			if j+1 < len(data) && data[j+1] == '\n' {
				lines++
			}
			j++ // an escaped character, never the end
		case c == '\n':
			lines++
			if !multi {
				return j - 1, lines - 1 // a one-line string ends at the line's end; the newline is counted by the caller
			}
		case c == q && !multi:
			return j, lines
		case c == q && j+2 < len(data) && data[j+1] == q && data[j+2] == q:
			// A closing triple quote; up to two more quotes may belong to
			// the string ("""a""""" is a"").
			j += 2
			for k := 0; k < 2 && j+1 < len(data) && data[j+1] == q; k++ {
				j++
			}
			return j, lines
		}
	}
	return len(data) - 1, lines
}
