//go:build !unix

package wav_test

import "time"

// processCPU is not measured on this platform; the CPU-time metric is
// then left out.
func processCPU() time.Duration { return 0 }
