package measure

import (
	"math"

	"github.com/kweigh/kweigh/loudness"
)

// DownmixMethod names the fold-down kweigh measures for surround files:
// the ITU-R BS.775 Lo/Ro downmix (from memory: centre and surrounds at
// −3 dB, 0.7071, into their side; LFE dropped). Back channels (Lb/Rb) of a
// 7.1 layout go with the surrounds of their side at the same gain (common
// practice, no published source).
const DownmixMethod = "Lo = L + 0.707·C + 0.707·Ls (+ 0.707·Lb), Ro = R + 0.707·C + 0.707·Rs (+ 0.707·Rb); LFE dropped"

// downmixGain is −3 dB as an amplitude, 1/√2.
var downmixGain = 1 / math.Sqrt2

// Downmix is the loudness of a surround file's stereo fold-down: what a
// listener with a stereo receiver hears. Some specs (ATSC A/85) ask for it
// to be checked as well as the surround mix itself.
type Downmix struct {
	Method         string   `json:"method"`
	IntegratedLUFS *float64 `json:"integrated_lufs"`
	TruePeakDBTP   *float64 `json:"true_peak_dbtp"`
}

// downmixer folds interleaved surround frames to Lo/Ro and meters them.
type downmixer struct {
	channels int
	left     []float64 // gain of each input channel into Lo
	right    []float64 // gain of each input channel into Ro
	gains    []float64 // left and right interleaved: Lo, Ro gain per channel
	stereo   []float64
	meter    *loudness.Meter
}

// newDownmixer returns nil when the layout is not a surround layout with
// L, R, C, Ls and Rs, the channels the fold-down is defined on.
func newDownmixer(layout []string, sampleRate int) *downmixer {
	d := &downmixer{channels: len(layout), left: make([]float64, len(layout)), right: make([]float64, len(layout))}
	need := map[string]bool{"L": false, "R": false, "C": false, "Ls": false, "Rs": false}
	for i, label := range layout {
		if _, ok := need[label]; ok {
			need[label] = true
		}
		switch label {
		case "L":
			d.left[i] = 1
		case "R":
			d.right[i] = 1
		case "C":
			d.left[i], d.right[i] = downmixGain, downmixGain
		case "Ls", "Lb":
			d.left[i] = downmixGain
		case "Rs", "Rb":
			d.right[i] = downmixGain
		}
	}
	for _, found := range need {
		if !found {
			return nil
		}
	}
	for i := range layout {
		d.gains = append(d.gains, d.left[i], d.right[i])
	}
	meter, err := loudness.NewMeter(sampleRate, []float64{1, 1})
	if err != nil {
		return nil
	}
	// Only the fold-down's highest true peak is reported (Downmix), so
	// its search skips whatever cannot beat the highest so far.
	meter.StreamTruePeakOnly()
	d.meter = meter
	return d
}

// writeBeside folds one block of interleaved frames in the hygiene probes'
// pass over it and meters the fold-down beside the block itself by main,
// the surround meter: h takes the block as h.write does, and
// hygiene.writeFold makes the fold-down into the meter's buffer with the
// same operations in the same order as foldAny (TestProbesMatchReference
// checks it bit for bit); loudness.Meter.WriteBeside then runs both
// meters' K-weighting in one kernel call where the kernel set has the
// eight-lane one, with the same bits as main.Write(buf) and a Write of
// the fold-down. It returns the index of the first frame whose fold-down
// the meter had to reject (beyond loudness.MaxMagnitude), or -1.
func (d *downmixer) writeBeside(main *loudness.Meter, buf []float64, h *hygiene) int {
	out := d.buffer(len(buf) / d.channels)
	h.writeFold(buf, out, d.gains)
	before := d.meter.Rejected()
	main.WriteBeside(buf, d.meter, out)
	if d.meter.Rejected() == before {
		return -1
	}
	return firstRejected(out) / 2
}

// buffer returns the fold-down buffer for frames frames.
func (d *downmixer) buffer(frames int) []float64 {
	if cap(d.stereo) < 2*frames {
		d.stereo = make([]float64, 2*frames)
	}
	return d.stereo[:2*frames]
}

// result returns the fold-down's figures.
func (d *downmixer) result() *Downmix {
	r := d.meter.Result()
	dm := &Downmix{Method: DownmixMethod}
	if r.Integrated.Defined {
		v := r.Integrated.Value
		dm.IntegratedLUFS = &v
	}
	dm.TruePeakDBTP = peak(math.Max(r.MaxTruePeak(), r.MaxSamplePeak()))
	return dm
}
