package loudness

import (
	"runtime"
	"syscall"
	"time"
)

// threadCPU returns the CPU time the calling OS thread has used. On a
// machine shared with other work, benchmarks report × real time against it
// as well as against wall time: it counts only the cycles this thread got.
func threadCPU() time.Duration {
	const rusageThread = 1 // RUSAGE_THREAD, Linux
	var ru syscall.Rusage
	if err := syscall.Getrusage(rusageThread, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// lockThread pins the benchmark goroutine to its OS thread so threadCPU
// measures it; call the returned function when done.
func lockThread() func() {
	runtime.LockOSThread()
	return runtime.UnlockOSThread
}
