//go:build !unix

package audiotest

import "time"

// ProcessCPU is not measured on this system: it returns 0, and benchmarks
// then report wall-clock speed only.
func ProcessCPU() time.Duration { return 0 }
