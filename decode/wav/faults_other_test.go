//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package wav_test

import "time"

// minorFaults is -1: no fault count here.
func minorFaults() int64 { return -1 }

// usage has no figures here.
func usage() (user, sys time.Duration, faults int64) { return 0, 0, -1 }
