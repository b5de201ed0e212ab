package audiotest_test

import (
	"testing"
	"time"
)

// spinsUntil keeps the calling goroutine busy until clock has advanced by
// 20 ms, giving up after 10 s of wall time (a loaded machine may give it
// only a share of a core). It reports whether the clock advanced.
func spinsUntil(t *testing.T, clock func() time.Duration) bool {
	t.Helper()
	start, deadline := clock(), time.Now().Add(10*time.Second)
	x := 1.0
	for time.Now().Before(deadline) {
		for range 100000 {
			x = x*1.0000001 + 1e-9
		}
		if clock()-start >= 20*time.Millisecond {
			return x > 0
		}
	}
	return false
}
