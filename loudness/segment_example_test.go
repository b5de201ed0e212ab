package loudness_test

import (
	"fmt"
	"math"

	"github.com/kweigh/kweigh/loudness"
)

// A 60 s programme of the invented "Tidewater Nights" late show, measured
// in two halves at once (as two cores would) and joined: the same figures
// as one meter over the whole stream. Each half-meter starts at its first
// 100 ms block and is warmed with the second of audio before it.
func ExampleMeter_Join() {
	const rate = 8000
	weights := []float64{1} // mono
	n := 60 * rate
	x := make([]float64, n)
	for i := range x {
		// A 440 Hz tone whose level swells and fades every 10 s, at most
		// −21 dBFS (test tones can damage hearing at high level).
		env := 0.05 + 0.04*math.Sin(2*math.Pi*float64(i)/(10*rate))
		x[i] = env * math.Sin(2*math.Pi*440*float64(i)/rate)
	}

	whole, _ := loudness.NewMeter(rate, weights)
	whole.Write(x)

	joined, _ := loudness.NewMeter(rate, weights)
	cut := 30 * rate // block 300
	first, _ := loudness.NewMeter(rate, weights)
	_ = first.StartAt(0)
	first.Write(x[:cut])
	second, _ := loudness.NewMeter(rate, weights)
	_ = second.StartAt(300)
	second.Warm(x[cut-loudness.PreRollSeconds*rate : cut])
	second.Write(x[cut:])
	_ = joined.Join(first)
	_ = joined.Join(second)

	a, b := whole.Result(), joined.Result()
	fmt.Printf("integrated %.4f / %.4f LUFS\n", a.Integrated.Value, b.Integrated.Value)
	fmt.Printf("loudness range %.4f / %.4f LU\n", a.LoudnessRange.Value, b.LoudnessRange.Value)
	fmt.Printf("true peak equal: %v\n", a.TruePeak[0] == b.TruePeak[0])
	fmt.Printf("integrated within 1e-9 LU: %v\n", math.Abs(a.Integrated.Value-b.Integrated.Value) <= 1e-9)
	// Output:
	// integrated -27.5222 / -27.5222 LUFS
	// loudness range 12.9361 / 12.9361 LU
	// true peak equal: true
	// integrated within 1e-9 LU: true
}
