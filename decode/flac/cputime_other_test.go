//go:build !unix

package flac

import "time"

// processCPU is not measured on this system; benchmarks then report wall
// clock only.
func processCPU() time.Duration { return 0 }
