package limiter_test

import (
	"fmt"
	"math"

	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/loudness/limiter"
)

// A 997 Hz sine with a 0 dBFS peak, limited to a -3 dBTP ceiling with the
// default 0.1 dB margin, measures -3.1 dBTP on the BS.1770 true-peak meter.
func Example() {
	const rate = 48000
	l, err := limiter.New(limiter.Config{SampleRate: rate, Channels: 1, CeilingDBTP: -3, MarginDB: limiter.DefaultMarginDB})
	if err != nil {
		fmt.Println(err)
		return
	}
	x := make([]float64, rate)
	for i := range x {
		x[i] = math.Sin(2 * math.Pi * 997 * float64(i) / rate)
	}
	y := make([]float64, len(x)+l.Latency())
	n := l.Process(y, x)
	n += l.Flush(y[n:])
	tp, _ := loudness.NewTruePeak(rate)
	peak := tp.Flush(tp.Peak(y[:n], 0))
	fmt.Printf("%d samples out, true peak %.1f dBTP, %.1f dB of reduction\n", n, loudness.DB(peak), l.ReductionDB())
	// Output: 48000 samples out, true peak -3.1 dBTP, 3.1 dB of reduction
}
