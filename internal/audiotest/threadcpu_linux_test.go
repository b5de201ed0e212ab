package audiotest_test

import (
	"runtime"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

func TestThreadCPUAdvances(t *testing.T) {
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	if !spinsUntil(t, audiotest.ThreadCPU) {
		t.Error("ThreadCPU did not advance by 20 ms while the test spun for 10 s")
	}
}
