package flac

//go:generate go run lpcgen.go

// restoreFixed restores x[order:] in place from the residual it holds,
// with the fixed polynomial predictor of the given order (RFC 9639,
// section 9.2.5); x[:order] are the warm-up samples. Sums are formed in
// 64 bits, so 32-bit samples cannot overflow them.
func restoreFixed(x []int32, order int) {
	switch order {
	case 1:
		for i := 1; i < len(x); i++ {
			x[i] += x[i-1]
		}
	case 2:
		for i := 2; i < len(x); i++ {
			h := x[i-2 : i+1 : i+1]
			h[2] += int32(2*int64(h[1]) - int64(h[0]))
		}
	case 3:
		for i := 3; i < len(x); i++ {
			h := x[i-3 : i+1 : i+1]
			h[3] += int32(3*(int64(h[2])-int64(h[1])) + int64(h[0]))
		}
	case 4:
		for i := 4; i < len(x); i++ {
			h := x[i-4 : i+1 : i+1]
			h[4] += int32(4*(int64(h[3])+int64(h[1])) - 6*int64(h[2]) - int64(h[0]))
		}
	}
}

// restoreLPC restores x[len(c):] in place from the residual it holds, with
// the quantised linear predictor c and shift (RFC 9639, section 9.2.6):
// sample i is its residual plus (Σ c[j]·x[i-1-j]) >> shift, the sum in 64
// bits. Orders up to maxUnrolled run a loop written out for the order
// (lpc_orders.go); restoreLPCPlain is the reference for all of them.
func restoreLPC(x []int32, c []int32, shift uint) {
	if !restoreLPCUnrolled(x, c, shift) {
		restoreLPCPlain(x, c, shift)
	}
}

// restoreLPCPlain is restoreLPC as a plain double loop, for any order.
func restoreLPCPlain(x []int32, c []int32, shift uint) {
	for i := len(c); i < len(x); i++ {
		var sum int64
		for j, cj := range c {
			sum += int64(cj) * int64(x[i-1-j])
		}
		x[i] += int32(sum >> shift)
	}
}
