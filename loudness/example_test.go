package loudness_test

import (
	"fmt"
	"math"

	"github.com/kweigh/kweigh/loudness"
)

// A 20 s line-up tone for the invented "Harbour Lights" radio drama: 1 kHz
// at −23 dBFS on both channels of a 48 kHz stereo stream, which by EBU Tech
// 3341 test 1 reads −23 LUFS. (Full-scale test tones can damage hearing and
// loudspeakers; this one is well below.)
func ExampleMeter() {
	const rate = 48000
	weights, err := loudness.Weights([]string{"L", "R"})
	if err != nil {
		fmt.Println(err)
		return
	}
	m, err := loudness.NewMeter(rate, weights)
	if err != nil {
		fmt.Println(err)
		return
	}
	a := math.Pow(10, -23.0/20)
	block := make([]float64, 2*4800) // 100 ms of interleaved frames
	for n := 0; n < 20*rate; {
		for i := 0; i < len(block); i += 2 {
			v := a * math.Sin(2*math.Pi*1000*float64(n)/rate)
			block[i], block[i+1] = v, v
			n++
		}
		m.Write(block)
	}
	r := m.Result()
	fmt.Printf("integrated %.1f LUFS\n", r.Integrated.Value)
	fmt.Printf("loudness range %.1f LU\n", r.LoudnessRange.Value)
	fmt.Printf("max momentary %.1f LUFS, max short-term %.1f LUFS\n", r.MaxMomentary.Value, r.MaxShortTerm.Value)
	fmt.Printf("true peak %.2f dBTP, sample peak %.2f dBFS\n", loudness.DB(r.MaxTruePeak()), loudness.DB(r.MaxSamplePeak()))
	fmt.Printf("%d momentary values at 10 Hz\n", len(r.Series.Momentary))

	m.Reset()
	m.Write(block[:2*4800]) // 100 ms: too short for any loudness
	fmt.Println("100 ms:", m.Result().Integrated.Why)
	// Output:
	// integrated -23.0 LUFS
	// loudness range 0.0 LU
	// max momentary -23.0 LUFS, max short-term -23.0 LUFS
	// true peak -22.99 dBTP, sample peak -23.00 dBFS
	// 200 momentary values at 10 Hz
	// 100 ms: shorter than one 400 ms gating block: BS.1770 defines no loudness
}
