//go:build unix

package aiff

import (
	"syscall"
	"time"
)

// processCPU returns the CPU time (user + system) the test process has
// used, so benchmarks can report speed per core however busy the shared
// machine is.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
