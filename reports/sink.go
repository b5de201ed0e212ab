package reports

import (
	"bufio"
	"errors"
	"fmt"
	"io"
)

// ErrClosed is returned by Write and Close on a writer that was already
// closed.
var ErrClosed = errors.New("reports: writer already closed")

// errNilRecord is kept as the writer's error when Write is given nil.
var errNilRecord = errors.New("Write called with a nil record")

// sink is the buffered output every writer shares. Like bufio.Writer it
// keeps the first error, whether it came from the underlying writer or from
// encoding a record, and reports it from then on.
type sink struct {
	format Format
	buf    *bufio.Writer
	err    error
	closed bool
}

func newSink(w io.Writer, f Format) sink {
	return sink{format: f, buf: bufio.NewWriter(w)}
}

// fail records err as the writer's error unless one is already kept.
func (s *sink) fail(err error) error {
	if s.err == nil && err != nil {
		s.err = fmt.Errorf("reports: %s: %w", s.format, err)
	}
	return s.err
}

// ready returns the error that stops any further output, if any.
func (s *sink) ready() error {
	if s.closed {
		return ErrClosed
	}
	return s.err
}

func (s *sink) print(text string) {
	if s.err != nil {
		return
	}
	if _, err := s.buf.WriteString(text); err != nil {
		s.fail(err)
	}
}

func (s *sink) printf(format string, args ...any) {
	s.print(fmt.Sprintf(format, args...))
}

func (s *sink) write(p []byte) {
	if s.err != nil {
		return
	}
	if _, err := s.buf.Write(p); err != nil {
		s.fail(err)
	}
}

// flush pushes buffered output to the underlying writer; the streaming
// formats call it after every record.
func (s *sink) flush() error {
	if s.err == nil {
		s.fail(s.buf.Flush())
	}
	return s.err
}

// close flushes and marks the writer closed.
func (s *sink) close() error {
	if s.closed {
		return ErrClosed
	}
	err := s.flush()
	s.closed = true
	return err
}
