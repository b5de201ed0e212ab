package watch

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strings"
	"time"

	"github.com/kweigh/kweigh/reports"
)

// placedRecord is the check record with placed_at (when the file was
// placed, RFC 3339 UTC) and placed_path (where it went; null when it
// stayed) added as the last keys: the line on stdout and the webhook body.
func placedRecord(record []byte, at time.Time, dest string) []byte {
	rec := bytes.TrimSpace(record)
	if len(rec) < 2 || rec[len(rec)-1] != '}' {
		rec = []byte("{}")
	}
	var b bytes.Buffer
	b.Write(rec[:len(rec)-1])
	if len(bytes.TrimSpace(rec[1:len(rec)-1])) > 0 {
		b.WriteByte(',')
	}
	ts, _ := json.Marshal(at.UTC().Format(time.RFC3339Nano))
	fmt.Fprintf(&b, `"placed_at":%s,"placed_path":`, ts)
	if dest == "" {
		b.WriteString("null")
	} else {
		p, _ := json.Marshal(dest)
		b.Write(p)
	}
	b.WriteByte('}')
	return b.Bytes()
}

// indentJSON indents a record for the report file; a record that does not
// parse is written as it is.
func indentJSON(record []byte) []byte {
	var b bytes.Buffer
	if err := json.Indent(&b, record, "", "  "); err != nil {
		return record
	}
	return b.Bytes()
}

// verdictWords are the text format's verdicts, always a word and a symbol.
var verdictWords = map[string]string{
	"pass": "PASS  ✓", "warn": "WARN  !", "fail": "FAIL  ✗", "error": "ERROR ⊘",
}

// emit writes one placed file's line to Output.
func (w *watcher) emit(e Entry, line []byte) {
	if w.o.Output == nil {
		return
	}
	w.outMu.Lock()
	defer w.outMu.Unlock()
	if w.o.Format == "text" {
		word := verdictWords[e.Verdict]
		if word == "" {
			word = strings.ToUpper(e.Verdict)
		}
		where := "stays in the inbox"
		if e.Dest != "" {
			where = "→ " + reports.Printable(e.Dest)
		}
		text := fmt.Sprintf("%s  %s  %s", word, reports.Printable(e.Path()), where)
		if e.Error != "" {
			text += "  (" + reports.Printable(e.Error) + ")"
		}
		fmt.Fprintln(w.o.Output, text)
		return
	}
	w.o.Output.Write(append(line, '\n'))
}
