//go:build unix

package audiotest_test

import (
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

func TestProcessCPUAdvances(t *testing.T) {
	if !spinsUntil(t, audiotest.ProcessCPU) {
		t.Error("ProcessCPU did not advance by 20 ms while the test spun for 10 s")
	}
}
