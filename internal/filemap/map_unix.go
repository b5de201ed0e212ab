//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package filemap

import (
	"fmt"
	"os"
	"unsafe"

	"golang.org/x/sys/unix"
)

var pageSize = int64(os.Getpagesize())

// View maps the bytes of a regular file up to end, one window at a time.
// It is not safe for concurrent use; several Views of one file (one per
// section of it being read at once) are independent.
type View struct {
	f      *os.File
	end    int64  // no byte at or past end is ever mapped
	win    []byte // the current window, nil when none is mapped
	winOff int64  // file offset of win[0]
}

// Open returns a View for reading bytes [start, end) of src when src is a
// regular *os.File and the stretch is at least MinBytes long, and nil
// otherwise (the caller then reads). Nothing is mapped until the first
// Bytes.
func Open(src any, start, end int64) *View {
	f, ok := src.(*os.File)
	if !ok || end-start < MinBytes || start < 0 {
		return nil
	}
	st, err := f.Stat()
	if err != nil || !st.Mode().IsRegular() {
		return nil
	}
	return &View{f: f, end: end}
}

// Bytes returns the mapped bytes of the file from off on: at least
// atLeast of them and at most n, within the View's end. It maps a new
// window when the current one does not hold atLeast bytes from off. The
// slice is valid until the next Bytes or Close, and may be read only
// inside Guard. An error means the window could not be mapped (the caller
// reads instead).
func (v *View) Bytes(off int64, n, atLeast int) ([]byte, error) {
	if off < 0 || atLeast < 1 || n < atLeast || off+int64(atLeast) > v.end {
		return nil, fmt.Errorf("filemap: %d bytes at %d outside the mapped stretch ending at %d", atLeast, off, v.end)
	}
	if v.win == nil || off < v.winOff || off+int64(atLeast) > v.winOff+int64(len(v.win)) {
		if err := v.mapAt(off, atLeast); err != nil {
			return nil, err
		}
	}
	from := int(off - v.winOff)
	return v.win[from:min(len(v.win), from+n)], nil
}

// mapAt replaces the window by one that starts at the page holding off
// and holds at least atLeast bytes from off.
func (v *View) mapAt(off int64, atLeast int) error {
	v.unmap()
	base := off &^ (pageSize - 1)
	length := min(max(windowBytes, off-base+int64(atLeast)), v.end-base)
	if int64(int(length)) != length {
		return fmt.Errorf("filemap: window of %d bytes too large for this system", length)
	}
	sc, err := v.f.SyscallConn()
	if err != nil {
		return err
	}
	var win []byte
	var merr error
	if err := sc.Control(func(fd uintptr) {
		win, merr = unix.Mmap(int(fd), base, int(length), unix.PROT_READ, unix.MAP_SHARED)
	}); err != nil {
		return err
	}
	if merr != nil {
		return fmt.Errorf("filemap: mapping %d bytes at %d of %s: %w", length, base, v.f.Name(), merr)
	}
	// Read ahead of the faults and let the pages go first under memory
	// pressure: the audio is read once, from front to back. Advice only;
	// a system that ignores it reads the same bytes.
	_ = unix.Madvise(win, unix.MADV_SEQUENTIAL)
	v.win, v.winOff = win, base
	return nil
}

// Guard runs fn, which reads the bytes Bytes returned, and returns the
// file offset of the byte it faulted on and true when the file no longer
// holds that byte's page (it shrank while mapped: SIGBUS). A fault
// anywhere else is not caught.
func (v *View) Guard(fn func()) (off int64, faulted bool) {
	addr, faulted := guard(fn, v.holds)
	if !faulted {
		return 0, false
	}
	return v.winOff + int64(addr-v.base()), true
}

// base is the address of the window's first byte.
func (v *View) base() uintptr { return uintptr(unsafe.Pointer(unsafe.SliceData(v.win))) }

// holds says whether addr lies in the current window.
func (v *View) holds(addr uintptr) bool {
	return len(v.win) > 0 && addr >= v.base() && addr-v.base() < uintptr(len(v.win))
}

// PageStart returns the offset of the start of the page holding off.
func PageStart(off int64) int64 { return off &^ (pageSize - 1) }

// Size returns the file's size now (it may have shrunk since it was
// opened).
func (v *View) Size() (int64, error) {
	st, err := v.f.Stat()
	if err != nil {
		return 0, err
	}
	return st.Size(), nil
}

// Name returns the file's name.
func (v *View) Name() string { return v.f.Name() }

// Close unmaps the current window. The View must not be used after it;
// closing twice is harmless.
func (v *View) Close() error {
	return v.unmap()
}

func (v *View) unmap() error {
	if v.win == nil {
		return nil
	}
	err := unix.Munmap(v.win)
	v.win = nil
	return err
}
