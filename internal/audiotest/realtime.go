package audiotest

import (
	"runtime"
	"testing"
	"time"
)

// Realtime times a benchmark loop and reports its speed as seconds of audio
// handled per second of work: against wall time ("x-realtime") and against
// CPU time ("x-realtime-cpu"), which on a machine shared with other work is
// the fair one-core figure. Start one with StartRealtime or
// StartRealtimeThread right before the loop and call Report right after it.
type Realtime struct {
	b        *testing.B
	cpu      func() time.Duration
	cpuStart time.Duration
	unlock   func()
}

// StartRealtime resets b's timer and starts counting the CPU time of the
// whole process (ProcessCPU), garbage collection included.
func StartRealtime(b *testing.B) *Realtime {
	b.ResetTimer()
	return &Realtime{b: b, cpu: ProcessCPU, cpuStart: ProcessCPU()}
}

// StartRealtimeThread locks the benchmark goroutine to its OS thread, resets
// b's timer and starts counting that thread's CPU time only (ThreadCPU;
// Linux). Report unlocks the thread.
func StartRealtimeThread(b *testing.B) *Realtime {
	runtime.LockOSThread()
	b.ResetTimer()
	return &Realtime{b: b, cpu: ThreadCPU, cpuStart: ThreadCPU(), unlock: runtime.UnlockOSThread}
}

// Report stops b's timer and reports audioSecondsPerOp × b.N seconds of
// audio per second of wall time as "x-realtime" and per second of CPU time
// as "x-realtime-cpu". The CPU metric is left out where the system does not
// measure CPU time.
func (r *Realtime) Report(audioSecondsPerOp float64) {
	cpu := r.cpu() - r.cpuStart
	r.b.StopTimer()
	if r.unlock != nil {
		r.unlock()
	}
	audio := audioSecondsPerOp * float64(r.b.N)
	r.b.ReportMetric(audio/r.b.Elapsed().Seconds(), "x-realtime")
	if cpu > 0 {
		r.b.ReportMetric(audio/cpu.Seconds(), "x-realtime-cpu")
	}
}
