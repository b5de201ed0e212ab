//go:build unix

package audiotest

import (
	"syscall"
	"time"
)

// ProcessCPU returns the CPU time (user + system) the test process has used
// so far, or 0 where the system does not provide it. A benchmark that
// counts it reports its speed per core however busy a shared machine is.
func ProcessCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
