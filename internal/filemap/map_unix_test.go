//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package filemap

import (
	"bytes"
	"os"
	"path/filepath"
	"runtime/debug"
	"testing"
)

// testFile writes n bytes of a position-dependent pattern and returns the
// open file and the bytes.
func testFile(t *testing.T, n int) (*os.File, []byte) {
	t.Helper()
	data := make([]byte, n)
	for i := range data {
		data[i] = byte(i*7 + i>>9)
	}
	path := filepath.Join(t.TempDir(), "take.bin")
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	return f, data
}

// TestBytesAcrossWindows reads a file through windows of three pages from
// offsets that are not page multiples and checks every byte against the
// file, every slice's length against what was asked, and that no window
// reaches past the View's end.
func TestBytesAcrossWindows(t *testing.T) {
	was := windowBytes
	windowBytes = 3 * pageSize
	defer func() { windowBytes = was }()
	f, data := testFile(t, MinBytes+12345)
	const start = 101
	end := int64(len(data) - 7)
	v := Open(f, start, end)
	if v == nil {
		t.Fatal("Open refused a regular file")
	}
	defer v.Close()
	for _, step := range []int{1000, 4096, 9, 3*int(pageSize) + 5} {
		for off := int64(start); off < end; {
			atLeast := min(int(end-off), 17, step)
			b, err := v.Bytes(off, step, atLeast)
			if err != nil {
				t.Fatal(err)
			}
			if len(b) < atLeast || len(b) > step {
				t.Fatalf("step %d at %d: %d bytes, want %d to %d", step, off, len(b), atLeast, step)
			}
			if v.winOff+int64(len(v.win)) > end {
				t.Fatalf("window [%d, %d) past the end %d", v.winOff, v.winOff+int64(len(v.win)), end)
			}
			var got []byte
			if _, faulted := v.Guard(func() { got = append(got, b...) }); faulted {
				t.Fatal("fault on a whole file")
			}
			if !bytes.Equal(got, data[off:off+int64(len(b))]) {
				t.Fatalf("step %d: bytes at %d differ from the file", step, off)
			}
			off += int64(len(b))
		}
	}
	if _, err := v.Bytes(end-3, 8, 4); err == nil {
		t.Error("Bytes past the end succeeded")
	}
}

// TestGuardCatchesTruncation maps a file, truncates it to half a page past
// a page start, and touches the page after: the fault comes back as that
// page's offset, the goroutine's fault setting as it was, the process on.
// The cut page itself still reads (as zeros past the end), which is why
// callers also check Size.
func TestGuardCatchesTruncation(t *testing.T) {
	f, data := testFile(t, 4*MinBytes)
	v := Open(f, 0, int64(len(data)))
	defer v.Close()
	b, err := v.Bytes(0, len(data), len(data))
	if err != nil {
		t.Fatal(err)
	}
	cut := 5*pageSize + pageSize/2
	if err := os.Truncate(f.Name(), cut); err != nil {
		t.Fatal(err)
	}
	var sum int
	off, faulted := v.Guard(func() {
		for _, x := range b[cut-10:] {
			sum += int(x)
		}
	})
	if !faulted || off != 6*pageSize {
		t.Fatalf("Guard = %d, %v; want a fault at byte %d", off, faulted, 6*pageSize)
	}
	if debug.SetPanicOnFault(false) {
		t.Error("the goroutine was left panicking on faults")
	}
	if size, err := v.Size(); err != nil || size != cut {
		t.Errorf("Size = %d, %v; want %d", size, err, cut)
	}
	if _, faulted := v.Guard(func() { sum += int(b[cut+1]) }); faulted {
		t.Error("the cut page itself faulted")
	}
}

// TestGuardPassesOtherPanics: a panic that is not a fault on the View's
// window (a plain panic, a nil pointer) goes through Guard unchanged.
func TestGuardPassesOtherPanics(t *testing.T) {
	f, data := testFile(t, MinBytes)
	v := Open(f, 0, int64(len(data)))
	defer v.Close()
	if _, err := v.Bytes(0, 10, 10); err != nil {
		t.Fatal(err)
	}
	var nowhere *[16]byte
	for name, fn := range map[string]func(){
		"panic": func() { panic("a bug") },
		"nil":   func() { _ = nowhere[3] },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: Guard swallowed the panic", name)
				}
			}()
			v.Guard(fn)
		}()
		if debug.SetPanicOnFault(false) {
			t.Errorf("%s: the goroutine was left panicking on faults", name)
		}
	}
}

// TestOpenRefuses: what is not a regular *os.File, or too short to be
// worth it, is read, not mapped.
func TestOpenRefuses(t *testing.T) {
	f, data := testFile(t, MinBytes)
	if Open(bytes.NewReader(data), 0, int64(len(data))) != nil {
		t.Error("mapped a bytes.Reader")
	}
	if Open(f, 1, int64(len(data))) != nil {
		t.Error("mapped less than MinBytes")
	}
	r, w, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	defer w.Close()
	if Open(r, 0, 2*MinBytes) != nil {
		t.Error("mapped a pipe")
	}
}
