//go:build !linux

package audiotest

import "time"

// ThreadCPU is not measured on this system: it returns 0, and benchmarks
// then report wall-clock speed only.
func ThreadCPU() time.Duration { return 0 }
