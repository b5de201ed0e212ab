//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package filemap

import "errors"

// View is never made here: Open returns nil, and callers read.
type View struct{}

// Open returns nil: this system's files are read, not mapped.
func Open(src any, start, end int64) *View { return nil }

var errNoMapping = errors.New("filemap: no mappings on this system")

// Bytes is never called on a View of this system (there are none).
func (v *View) Bytes(off int64, n, atLeast int) ([]byte, error) { return nil, errNoMapping }

// Guard runs fn.
func (v *View) Guard(fn func()) (off int64, faulted bool) {
	fn()
	return 0, false
}

// PageStart returns off: there are no pages to round to here.
func PageStart(off int64) int64 { return off }

// Size fails: there is no file behind a View here.
func (v *View) Size() (int64, error) { return 0, errNoMapping }

// Name is empty.
func (v *View) Name() string { return "" }

// Close does nothing.
func (v *View) Close() error { return nil }
