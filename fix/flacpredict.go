package fix

import (
	"math"

	"github.com/mewkiz/flac/frame"
)

// FLAC prediction for the encoder. github.com/mewkiz/flac's encoder writes
// whatever subframe description it is given, but its own analysis tries
// only the fixed predictors with one Rice partition, which leaves files
// about half as large again as the reference encoder's. predictSubframe
// does the analysis the FLAC format is built for (IETF RFC 9639 §9.2;
// the method is the reference encoder's, described here from memory):
// linear prediction from the windowed autocorrelation (Levinson–Durbin),
// quantised coefficients, and partitioned Rice coding with a parameter per
// partition, compared with the fixed predictors; the cheapest wins.

// Analysis limits (the FLAC "subset" allows LPC orders up to 12 at 48 kHz
// and below, and Rice partition orders up to 8).
const (
	maxLPCOrder  = 12
	lpcPrecision = 14 // bits per quantised coefficient
	maxPartOrder = 8
)

// lpcOrders are the prediction orders tried.
var lpcOrders = []int{4, 8, 12}

// predictSubframe chooses the prediction for x (the channel exactly as the
// encoder will code it: after stereo decorrelation, bps bits per sample)
// and writes the choice into sf's header fields; sf.Samples is not touched.
// It leaves sf verbatim (for the library's own analysis) when x is too
// short to be worth it or no predictor helps.
func predictSubframe(sf *frame.Subframe, x []int32, bps int) {
	n := len(x)
	sf.Pred = frame.PredVerbatim
	if n < 64 {
		return
	}
	best := int64(n) * int64(bps) // verbatim
	res := make([]int64, n)
	// Fixed predictors, orders 0 to 4.
	for order := 0; order <= 4; order++ {
		fixedResiduals(res, x, order)
		bits, parts, po, rice2, ok := riceCost(res[order:], n, order)
		if !ok {
			continue
		}
		bits += int64(order) * int64(bps)
		if bits < best {
			best = bits
			setRice(sf, frame.PredFixed, order, parts, po, rice2)
			sf.Coeffs, sf.CoeffPrec, sf.CoeffShift = nil, 0, 0
		}
	}
	// Linear prediction.
	lpc := lpcCoefficients(x)
	for _, order := range lpcOrders {
		if order >= n || lpc[order] == nil {
			continue
		}
		q, shift, ok := quantise(lpc[order])
		if !ok || !lpcResiduals(res, x, q, shift) {
			continue
		}
		bits, parts, po, rice2, ok := riceCost(res[order:], n, order)
		if !ok {
			continue
		}
		bits += int64(order)*int64(bps) + 4 + 5 + int64(order)*lpcPrecision
		if bits < best {
			best = bits
			setRice(sf, frame.PredFIR, order, parts, po, rice2)
			sf.Coeffs, sf.CoeffPrec, sf.CoeffShift = q, lpcPrecision, shift
		}
	}
}

func setRice(sf *frame.Subframe, pred frame.Pred, order int, params []uint, po int, rice2 bool) {
	sf.Pred, sf.Order = pred, order
	sf.ResidualCodingMethod = frame.ResidualCodingMethodRice1
	if rice2 {
		sf.ResidualCodingMethod = frame.ResidualCodingMethodRice2
	}
	parts := make([]frame.RicePartition, len(params))
	for i, k := range params {
		parts[i].Param = k
	}
	sf.RiceSubframe = &frame.RiceSubframe{PartOrder: po, Partitions: parts}
}

// fixedResiduals writes the residuals of the fixed predictor of the given
// order (FLAC's polynomial predictors) into res[order:].
func fixedResiduals(res []int64, x []int32, order int) {
	for i := order; i < len(x); i++ {
		v := int64(x[i])
		switch order {
		case 1:
			v -= int64(x[i-1])
		case 2:
			v -= 2*int64(x[i-1]) - int64(x[i-2])
		case 3:
			v -= 3*int64(x[i-1]) - 3*int64(x[i-2]) + int64(x[i-3])
		case 4:
			v -= 4*int64(x[i-1]) - 6*int64(x[i-2]) + 4*int64(x[i-3]) - int64(x[i-4])
		}
		res[i] = v
	}
}

// lpcCoefficients returns, for each order up to maxLPCOrder, the predictor
// a₁…aₚ (x̂[i] = Σ aⱼ·x[i−j]) from the Welch-windowed autocorrelation by
// the Levinson–Durbin recursion; nil for an order the recursion cannot
// reach (a silent or degenerate block).
func lpcCoefficients(x []int32) [][]float64 {
	n := len(x)
	w := make([]float64, n)
	for i := range x {
		t := (2*float64(i) - float64(n-1)) / float64(n+1)
		w[i] = float64(x[i]) * (1 - t*t)
	}
	var r [maxLPCOrder + 1]float64
	for lag := range r {
		s := 0.0
		for i := lag; i < n; i++ {
			s += w[i] * w[i-lag]
		}
		r[lag] = s
	}
	out := make([][]float64, maxLPCOrder+1)
	if r[0] == 0 {
		return out
	}
	r[0] *= 1 + 1e-9 // a touch of white noise keeps the recursion stable
	a := make([]float64, maxLPCOrder+1)
	errPow := r[0]
	for p := 1; p <= maxLPCOrder; p++ {
		acc := r[p]
		for j := 1; j < p; j++ {
			acc -= a[j] * r[p-j]
		}
		k := acc / errPow
		if math.IsNaN(k) || math.Abs(k) >= 1 {
			break
		}
		next := append([]float64(nil), a...)
		next[p] = k
		for j := 1; j < p; j++ {
			next[j] = a[j] - k*a[p-j]
		}
		a = next
		errPow *= 1 - k*k
		out[p] = append([]float64(nil), a[1:p+1]...)
	}
	return out
}

// quantise turns predictor coefficients into lpcPrecision-bit integers and
// a right shift (0 to 15, as the format allows), feeding each rounding
// error into the next coefficient.
func quantise(c []float64) ([]int32, int32, bool) {
	cmax := 0.0
	for _, v := range c {
		cmax = max(cmax, math.Abs(v))
	}
	if cmax == 0 {
		return nil, 0, false
	}
	_, exp := math.Frexp(cmax) // cmax = f·2^exp, 0.5 ≤ f < 1
	shift := lpcPrecision - 1 - exp
	if shift < 0 {
		return nil, 0, false
	}
	shift = min(shift, 15)
	lim := float64(int(1)<<(lpcPrecision-1)) - 1
	q := make([]int32, len(c))
	e := 0.0
	for i, v := range c {
		s := v*math.Ldexp(1, shift) + e
		r := math.Round(s)
		r = min(max(r, -lim-1), lim)
		e = s - r
		q[i] = int32(r)
	}
	return q, int32(shift), true
}

// lpcResiduals writes the residuals of the quantised predictor into
// res[len(q):], computed as FLAC decoders compute the prediction; it
// reports false if one would not fit the 32-bit residuals the format
// codes.
func lpcResiduals(res []int64, x []int32, q []int32, shift int32) bool {
	p := len(q)
	for i := p; i < len(x); i++ {
		var s int64
		for j, c := range q {
			s += int64(c) * int64(x[i-j-1])
		}
		v := int64(x[i]) - s>>uint(shift)
		if v > math.MaxInt32/2 || v < math.MinInt32/2 {
			return false
		}
		res[i] = v
	}
	return true
}

// riceCost estimates the bits of residuals (the n−order values after the
// warm-up samples of an n-sample block) in partitioned Rice coding,
// choosing the partition order and each partition's parameter, and returns
// the estimate, the parameters, the partition order and whether the 5-bit
// parameter form (Rice2) is needed. The cost per partition of parameter k
// is cnt·(k+1) + Σ⌊f/2ᵏ⌋, estimated as cnt·(k+1) + Σf/2ᵏ − cnt/2, with f
// the zig-zag folded residuals.
func riceCost(res []int64, n, order int) (bits int64, params []uint, partOrder int, rice2, ok bool) {
	// Finest partitioning that the block allows.
	po := 0
	for po < maxPartOrder && n%(1<<(po+1)) == 0 && n>>(po+1) > order {
		po++
	}
	np := 1 << po
	size := n / np
	sums := make([]float64, np)
	counts := make([]int, np)
	for i, r := range res {
		idx := (i + order) / size
		f := uint64(r << 1)
		if r < 0 {
			f = uint64(-r<<1) - 1
		}
		sums[idx] += float64(f)
		counts[idx]++
	}
	best := int64(math.MaxInt64)
	for o := po; o >= 0; o-- {
		var total int64 = 4 + 2
		ks := make([]uint, len(sums))
		needs5 := false
		for p := range sums {
			k, b := bestRice(sums[p], counts[p])
			ks[p], total = k, total+b
			needs5 = needs5 || k > 14
		}
		if needs5 {
			total += int64(len(sums))
		}
		total += 4 * int64(len(sums))
		if total < best {
			best, params, partOrder, rice2 = total, ks, o, needs5
		}
		if o == 0 {
			break
		}
		// Merge pairs for the next coarser order.
		half := len(sums) / 2
		for p := range half {
			sums[p] = sums[2*p] + sums[2*p+1]
			counts[p] = counts[2*p] + counts[2*p+1]
		}
		sums, counts = sums[:half], counts[:half]
	}
	return best, params, partOrder, rice2, best < math.MaxInt64
}

// bestRice returns the Rice parameter (0 to 30) with the smallest
// estimated cost for cnt values summing to sum, and that cost.
func bestRice(sum float64, cnt int) (uint, int64) {
	if cnt == 0 {
		return 0, 0
	}
	c := float64(cnt)
	k0 := 0
	if mean := sum / c; mean > 1 {
		k0 = int(math.Log2(mean * math.Ln2))
	}
	bestK, bestB := uint(0), math.Inf(1)
	for k := max(0, k0-1); k <= min(30, k0+2); k++ {
		b := c*float64(k+1) + sum/math.Ldexp(1, k) - c/2
		if k == 0 {
			b = c + sum
		}
		if b < bestB {
			bestK, bestB = uint(k), b
		}
	}
	return bestK, int64(math.Ceil(bestB))
}
