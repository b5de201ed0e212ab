//go:build unix

package leftovers

import (
	"errors"
	"syscall"
)

// alive reports whether a process pid exists: signal 0 checks without
// sending anything; EPERM means it exists but belongs to another user.
func alive(pid int) bool {
	err := syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM)
}
