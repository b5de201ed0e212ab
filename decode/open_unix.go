//go:build unix

package decode

import (
	"os"
	"syscall"
)

// openNonBlocking opens path read-only with O_NONBLOCK, so that opening a
// FIFO returns at once instead of waiting for a writer.
func openNonBlocking(path string) (*os.File, error) {
	return os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
}

// clearNonBlocking puts a regular file back into blocking mode (O_NONBLOCK
// has no effect on regular files, but the runtime's poller treats the
// descriptor differently while it is set).
func clearNonBlocking(f *os.File) error {
	sc, err := f.SyscallConn()
	if err != nil {
		return err
	}
	var serr error
	if err := sc.Control(func(fd uintptr) { serr = syscall.SetNonblock(int(fd), false) }); err != nil {
		return err
	}
	return serr
}
