// Package loudness is kweigh's measurement engine: ITU-R BS.1770-4/5
// K-weighting, gated integrated loudness, momentary and short-term loudness
// (EBU Tech 3341), loudness range (EBU Tech 3342) and oversampled true peak
// (BS.1770 Annex 2). It works on interleaved float64 samples and knows
// nothing of files.
//
// SKELETON: the API below is the contract the rest of kweigh builds on; the
// engine helper fills in the implementation.
package loudness

import "math"

// Reading is a figure the standard may leave undefined (a file shorter than
// one gating block has no integrated loudness; all-silent audio is below the
// absolute gate). When Defined is false, Value is meaningless and Why says
// why in plain words.
type Reading struct {
	Value   float64
	Defined bool
	Why     string
}

// Result is everything the engine measured on one stream.
type Result struct {
	SampleRate int
	Channels   int
	Frames     int64

	Integrated    Reading // LUFS, gated (BS.1770)
	LoudnessRange Reading // LU (EBU Tech 3342)
	MaxMomentary  Reading // LUFS, highest 400 ms window
	MaxShortTerm  Reading // LUFS, highest 3 s window

	// TruePeak and SamplePeak are linear magnitudes (1.0 = full scale) per
	// channel in stream order, LFE included. Convert with DB.
	TruePeak   []float64
	SamplePeak []float64

	// Series holds the 10 Hz time series behind the figures above.
	Series Series
}

// MaxTruePeak returns the highest true peak over all channels (linear).
func (r Result) MaxTruePeak() float64 { return maxOf(r.TruePeak) }

// MaxSamplePeak returns the highest sample peak over all channels (linear).
func (r Result) MaxSamplePeak() float64 { return maxOf(r.SamplePeak) }

func maxOf(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		if x > m {
			m = x
		}
	}
	return m
}

// Series are per-100 ms values. Element i describes the window or block that
// ends at (i+1)·100 ms. A value is NaN where the window is not yet full (the
// first 3 momentary and 29 short-term updates) and -Inf where the window is
// digital silence.
type Series struct {
	// Momentary is the 400 ms loudness in LUFS at each 100 ms step.
	Momentary []float32
	// ShortTerm is the 3 s loudness in LUFS at each 100 ms step.
	ShortTerm []float32
	// TruePeak is the highest true peak over all channels inside the 100 ms
	// block, in dBTP.
	TruePeak []float32
	// SamplePeak is the highest |sample| over all channels inside the 100 ms
	// block, in dBFS.
	SamplePeak []float32
}

// DB converts a linear magnitude to decibels (20·log10); 0 gives -Inf.
func DB(linear float64) float64 { return 20 * math.Log10(linear) }

// Meter accumulates one stream. Build it once per stream with NewMeter, feed
// it with Write, read it with Result.
type Meter struct {
	// implementation by the engine
}

// NewMeter returns a meter for interleaved frames of len(weights) channels at
// sampleRate Hz (8 000 to 384 000). weights are the BS.1770 channel weights
// in stream order (see Weights); a weight of 0 excludes the channel from
// loudness (LFE) but not from true and sample peak.
func NewMeter(sampleRate int, weights []float64) (*Meter, error) {
	panic("not implemented")
}

// Write feeds interleaved frames. len(frames) must be a multiple of the
// channel count; Write panics otherwise.
func (m *Meter) Write(frames []float64) { panic("not implemented") }

// Result returns the measurement of everything written so far. It may be
// called more than once.
func (m *Meter) Result() Result { panic("not implemented") }

// Reset makes the meter ready for a new stream with the same configuration.
func (m *Meter) Reset() { panic("not implemented") }

// Weights returns the BS.1770 channel weight for each label (see package
// decode's label constants): 1.0 for front channels, 1.41 for surrounds,
// 0 for LFE, and the BS.1770-4/5 position rule for the rest.
func Weights(labels []string) ([]float64, error) { panic("not implemented") }
