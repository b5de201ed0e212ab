// Package filemap reads a stretch of a regular file through read-only
// memory mappings of bounded windows, so that a decoder converts samples
// straight from the page cache instead of having the kernel copy them into
// a buffer first (that copy is most of a read call's cost, and about what
// the 24-bit conversion after it costs).
//
// A mapping has a hazard a read call does not: when the file is truncated
// (or rewritten shorter) while it is mapped, touching a page past its new
// end raises SIGBUS, which would kill the process. View.Guard turns such a
// fault into a value the caller handles, and View.Size tells the caller
// where the file ends now. Files come from strangers and hot folders, so
// every access to mapped bytes must go through View.Guard.
//
// Windows are bounded (windowBytes) so that address space stays small on
// 32-bit systems whatever the length of the file; each View holds at most
// one window at a time. Where mappings are not available (other systems,
// files that are not regular), Open returns nil and callers keep their
// read calls.
package filemap

import (
	"runtime"
	"runtime/debug"
)

// windowBytes is the size of one mapping window: large enough that the
// mmap/munmap pair per window is lost in the conversion of its bytes (a
// 16 MiB window of 96 kHz stereo 24-bit audio is 29 s), small enough that a
// few readers at once on a 32-bit system take little of its address space.
// It is a variable only for the tests, which make windows of a few pages.
var windowBytes int64 = 16 << 20

// MinBytes is the least stretch worth mapping, a judgement rather than a
// measured break-even: a shorter stretch is four read calls or fewer, and
// mapping it adds three system calls (mmap, madvise, munmap) and a
// goroutine fault setting for a saving of well under a millisecond.
const MinBytes = 1 << 20

// MaxStep bounds the bytes a decoder converts per step from a mapping, so
// that a step's length fits an int on 32-bit systems whatever its
// destination holds.
const MaxStep = 1 << 30

// UnmapWhenCollected makes the garbage collector close view once owner,
// the decoder reading through it, is unreachable: a decoder dropped before
// its end without Close (a section abandoned after an error) then does not
// keep its window mapped. A nil view is ignored.
func UnmapWhenCollected[T any](owner *T, view *View) {
	if view != nil {
		runtime.AddCleanup(owner, func(v *View) { v.Close() }, view)
	}
}

// guard runs fn with memory faults turned into a panic it recovers (see
// runtime/debug.SetPanicOnFault) and returns the faulting address and true
// when fn touched memory it could not read and inside reports that address
// as one of the caller's; any other panic (a fault elsewhere, a bug) passes
// through unchanged. The setting is per goroutine and is restored before
// guard returns.
func guard(fn func(), inside func(addr uintptr) bool) (addr uintptr, faulted bool) {
	old := debug.SetPanicOnFault(true)
	defer func() {
		debug.SetPanicOnFault(old)
		if r := recover(); r != nil {
			if e, ok := r.(interface{ Addr() uintptr }); ok {
				if _, isRuntime := r.(runtime.Error); isRuntime && inside(e.Addr()) {
					addr, faulted = e.Addr(), true
					return
				}
			}
			panic(r)
		}
	}()
	fn()
	return 0, false
}
