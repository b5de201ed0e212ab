//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package wav_test

import "syscall"

// minorFaults returns the process's minor page faults so far (page-cache
// pages mapped without a disk read), or -1 when getrusage fails.
func minorFaults() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return -1
	}
	return int64(ru.Minflt)
}
