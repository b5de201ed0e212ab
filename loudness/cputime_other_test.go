//go:build !linux

package loudness

import "time"

func threadCPU() time.Duration { return 0 }

func lockThread() func() { return func() {} }
