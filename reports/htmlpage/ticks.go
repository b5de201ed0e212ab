package htmlpage

import "math"

// timeSteps are the tick spacings, in seconds, a clock reader expects:
// whole seconds, minutes and hours in 1-2-5-10-15-30 steps.
var timeSteps = []float64{
	1, 2, 5, 10, 15, 30,
	60, 2 * 60, 5 * 60, 10 * 60, 15 * 60, 30 * 60,
	3600, 2 * 3600, 3 * 3600, 6 * 3600, 12 * 3600, 24 * 3600,
}

// TimeTicks returns tick positions in seconds from 0 up to duration, spaced
// by the smallest of the usual clock steps (1, 2, 5, 10, 15, 30 s; 1, 2, 5,
// 10, 15, 30 min; 1, 2, 3, 6, 12, 24 h) that gives at most maxTicks ticks.
// Label them with reports.Clock.
func TimeTicks(duration float64, maxTicks int) []float64 {
	if !(duration > 0) || maxTicks < 2 {
		return []float64{0}
	}
	step := timeSteps[len(timeSteps)-1]
	for _, s := range timeSteps {
		if math.Floor(duration/s)+1 <= float64(maxTicks) {
			step = s
			break
		}
	}
	for math.Floor(duration/step)+1 > float64(maxTicks) {
		step *= 2 // beyond days: keep doubling
	}
	ticks := make([]float64, 0, maxTicks)
	for t := 0.0; t <= duration+1e-9; t += step {
		ticks = append(ticks, t)
	}
	return ticks
}

// levelTicks returns tick values from lo to hi (dB or LUFS) at a 1-2-5
// multiple that gives at most maxTicks ticks, starting at a multiple of the
// step.
func levelTicks(lo, hi float64, maxTicks int) []float64 {
	span := hi - lo
	if !(span > 0) || maxTicks < 2 {
		return []float64{lo}
	}
	var step float64
	for _, s := range []float64{1, 2, 3, 5, 6, 10, 20, 30, 50} {
		step = s
		if math.Floor(span/s)+1 <= float64(maxTicks) {
			break
		}
	}
	var ticks []float64
	for v := math.Ceil(lo/step) * step; v <= hi+1e-9; v += step {
		ticks = append(ticks, v)
	}
	return ticks
}
