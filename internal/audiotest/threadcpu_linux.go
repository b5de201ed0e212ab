package audiotest

import (
	"syscall"
	"time"
)

// rusageThread is RUSAGE_THREAD, which syscall does not name (Linux
// getrusage(2)).
const rusageThread = 1

// ThreadCPU returns the CPU time (user + system) the calling OS thread has
// used so far, or 0 where the system does not provide it (Linux only). The
// caller must be locked to its thread (runtime.LockOSThread), as
// StartRealtimeThread does; the figure then counts only the cycles the
// benchmark itself got, not the garbage collector's nor other work's.
func ThreadCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(rusageThread, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
