//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package wav_test

import (
	"syscall"
	"time"
)

// minorFaults returns the process's minor page faults so far (page-cache
// pages mapped without a disk read), or -1 when getrusage fails.
func minorFaults() int64 {
	_, _, faults := usage()
	return faults
}

// usage returns the process's user and system CPU time and minor page
// faults so far (faults -1 when getrusage fails).
func usage() (user, sys time.Duration, faults int64) {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0, 0, -1
	}
	return time.Duration(ru.Utime.Nano()), time.Duration(ru.Stime.Nano()), int64(ru.Minflt)
}
