package flac

import (
	"bytes"
	"io"
	"log"
	"sync"
)

// libraryLogMarker is the start of the line mewkiz/flac v1.0.14 writes with
// the standard logger for every frame header coded as 24 kHz or 176.4 kHz
// (frame/frame.go, parseSampleRate). The library has no logger of its own to
// redirect, so the line can only be caught on its way out of package log.
var libraryLogMarker = []byte("frame.Frame.parseHeader: The flac library test cases do not yet include")

// libraryLogFilter drops the library's per-frame lines and passes every
// other line to next unchanged. package log hands each formatted line to
// the writer in a single Write call, so a line is never split.
type libraryLogFilter struct{ next io.Writer }

func (f *libraryLogFilter) Write(p []byte) (int, error) {
	if bytes.Contains(p, libraryLogMarker) {
		return len(p), nil
	}
	return f.next.Write(p)
}

var logFilterMu sync.Mutex

// silenceLibraryLog wraps the standard logger's current output in a
// libraryLogFilter unless it is wrapped already. It is the least invasive
// way we found: the program's own log lines still go where they went (the
// filter forwards them), only the library's noise is dropped; the
// alternative, log.SetOutput(io.Discard) around each frame, would race with
// other goroutines and swallow their lines. If the program later calls
// log.SetOutput itself, the next FLAC decoder wraps the new writer.
func silenceLibraryLog() {
	logFilterMu.Lock()
	defer logFilterMu.Unlock()
	if _, ok := log.Writer().(*libraryLogFilter); ok {
		return
	}
	log.SetOutput(&libraryLogFilter{next: log.Writer()})
}
