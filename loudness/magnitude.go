package loudness

import "math"

// MaxMagnitude is the largest sample magnitude the meter measures (1e100,
// about +2000 dBFS). Larger samples, like NaN and ±Inf, are measured as
// silence and counted in Result.Rejected, and a caller should refuse the
// stream: no recording holds them, and beyond some such bound the squared
// sums the figures are made of overflow to +Inf.
//
// Why 1e100 is safe. Every figure is a sum of squares, a mean of such sums,
// a weighted interpolation or a maximum. For |x| ≤ 1e100, a K-weighted
// sample is below 1e101 (the filter's output is bounded by the sum of the
// magnitudes of its impulse response times the input bound, and that sum is
// below 10 at every supported rate), so its square is below 1e202. A 3 s
// window at 384 kHz holds 1.2·10⁶ samples per channel; with weights of at
// most 1.41 and even 10⁹ channels the window's weighted sum stays below
// 1e218, far under the float64 limit of 1.8e308. True peak is a 48-tap
// interpolation (below 1e102), and the gating means are averages of values
// that are each finite. A caller's own sums of squares over a whole file
// (2⁶³ samples at most, about 9.2e18) stay below 1e221. So no finite input
// within the bound can make any figure infinite or NaN, whatever its length,
// rate or channel count. (A fold-down that adds channels can exceed the
// bound where each channel is within it; its own meter rejects such samples
// the same way, and package measure refuses the file.)
const MaxMagnitude = 1e100

// maxMagnitudeBits is MaxMagnitude as float64 bits: for non-negative
// floats, and for NaN and +Inf above them, the bits order like the values.
var maxMagnitudeBits = math.Float64bits(MaxMagnitude)
