package rules

import "strings"

// keyLines maps each key of a TOML document to the 1-based line it is
// defined on, as a dotted path ("loudness.target_lufs"); tables map to their
// header line. The TOML library keeps key positions to itself, so this small
// scanner recovers them for error messages. It runs only on documents the
// library has already accepted, and it understands what spec files use:
// [table] and [[array]] headers, bare, quoted and dotted keys, strings
// (including multi-line ones), comments and arrays or inline tables spread
// over several lines. Keys inside inline tables are not listed; lineOf falls
// back to the enclosing key.
func keyLines(data []byte) map[string]int {
	lines := map[string]int{}
	var (
		table   string // current table path
		depth   int    // open [ or { of a value spanning lines
		openStr string // delimiter of an open multi-line string
	)
	for i, line := range strings.Split(string(data), "\n") {
		lineNo := i + 1
		rest := line
		if openStr != "" {
			end := strings.Index(rest, openStr)
			if end < 0 {
				continue
			}
			rest = rest[end+len(openStr):]
			openStr = ""
			depth, openStr = scanValue(rest, depth)
			continue
		}
		if depth > 0 {
			depth, openStr = scanValue(rest, depth)
			continue
		}
		t := strings.TrimSpace(rest)
		switch {
		case t == "" || t[0] == '#':
			continue
		case strings.HasPrefix(t, "[["):
			table = joinKey(splitKey(headerName(t[2:], "]]")))
			record(lines, table, lineNo)
			continue
		case t[0] == '[':
			table = joinKey(splitKey(headerName(t[1:], "]")))
			record(lines, table, lineNo)
			continue
		}
		eq := indexOutsideQuotes(t, '=')
		if eq < 0 {
			continue
		}
		key := joinKey(splitKey(t[:eq]))
		if table != "" {
			key = table + "." + key
		}
		record(lines, key, lineNo)
		depth, openStr = scanValue(t[eq+1:], 0)
	}
	return lines
}

// lineOf returns the line of key, or of its nearest enclosing key or table
// that keyLines found; 0 when none.
func lineOf(lines map[string]int, key string) int {
	for k := key; k != ""; {
		if n, ok := lines[k]; ok {
			return n
		}
		dot := strings.LastIndexByte(k, '.')
		if dot < 0 {
			break
		}
		k = k[:dot]
	}
	return 0
}

func record(lines map[string]int, key string, line int) {
	if _, seen := lines[key]; !seen {
		lines[key] = line
	}
}

// headerName returns the table name of a header line after its opening
// bracket(s), up to the closing bracket(s) outside quotes.
func headerName(s, closing string) string {
	if end := indexOutsideQuotes(s, closing[0]); end >= 0 {
		return s[:end]
	}
	return s
}

// splitKey splits a (possibly dotted, possibly quoted) key into its parts.
func splitKey(s string) []string {
	var parts []string
	for {
		dot := indexOutsideQuotes(s, '.')
		part := s
		if dot >= 0 {
			part = s[:dot]
		}
		part = strings.TrimSpace(part)
		if len(part) >= 2 && (part[0] == '"' || part[0] == '\'') && part[len(part)-1] == part[0] {
			part = part[1 : len(part)-1]
		}
		parts = append(parts, part)
		if dot < 0 {
			return parts
		}
		s = s[dot+1:]
	}
}

func joinKey(parts []string) string { return strings.Join(parts, ".") }

// indexOutsideQuotes returns the index of the first c in s that is not
// inside a basic or literal string, or -1.
func indexOutsideQuotes(s string, c byte) int {
	var quote byte
	for i := 0; i < len(s); i++ {
		switch {
		case quote == 0 && s[i] == c:
			return i
		case quote == 0 && (s[i] == '"' || s[i] == '\''):
			quote = s[i]
		case quote == '"' && s[i] == '\\':
			i++
		case quote != 0 && s[i] == quote:
			quote = 0
		}
	}
	return -1
}

// scanValue walks the value part of a line starting at bracket depth depth
// and returns the depth at the end of the line and the delimiter of a
// multi-line string left open ("" when none).
func scanValue(s string, depth int) (int, string) {
	for i := 0; i < len(s); i++ {
		switch c := s[i]; c {
		case '#':
			return depth, ""
		case '[', '{':
			depth++
		case ']', '}':
			if depth > 0 {
				depth--
			}
		case '"', '\'':
			delim := string(c)
			if strings.HasPrefix(s[i:], strings.Repeat(delim, 3)) {
				delim = strings.Repeat(delim, 3)
			}
			end := closingQuote(s[i+len(delim):], delim)
			if end < 0 {
				if len(delim) == 3 {
					return depth, delim
				}
				return depth, "" // unterminated single-line string: not valid TOML
			}
			i += len(delim) + end + len(delim) - 1
		}
	}
	return depth, ""
}

// closingQuote returns the index in s of the delimiter that closes a string
// opened with delim, skipping escapes in basic strings; -1 if none.
func closingQuote(s, delim string) int {
	for i := 0; i+len(delim) <= len(s); i++ {
		if delim[0] == '"' && s[i] == '\\' {
			i++
			continue
		}
		if strings.HasPrefix(s[i:], delim) {
			// A multi-line string may end with up to two extra quotes.
			for len(delim) == 3 && i+len(delim) < len(s) && s[i+len(delim)] == delim[0] {
				i++
			}
			return i
		}
	}
	return -1
}
