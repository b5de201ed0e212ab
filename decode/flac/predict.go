package flac

//go:generate go run lpcgen.go

// restoreFixed restores x[order:] in place from the residual it holds,
// with the fixed polynomial predictor of the given order (RFC 9639,
// section 9.2.5); x[:order] are the warm-up samples. Sums are formed in
// 64 bits, so 32-bit samples cannot overflow them.
func restoreFixed(x []int32, order int) {
	if len(x) <= order {
		return
	}
	out := x[order:]
	switch order {
	case 1:
		x1 := x[0]
		for i, r := range out {
			x1 += r
			out[i] = x1
		}
	case 2:
		x1, x2 := int64(x[1]), int64(x[0])
		for i, r := range out {
			v := int64(r + int32(2*x1-x2))
			out[i] = int32(v)
			x2, x1 = x1, v
		}
	case 3:
		x1, x2, x3 := int64(x[2]), int64(x[1]), int64(x[0])
		for i, r := range out {
			v := int64(r + int32(3*(x1-x2)+x3))
			out[i] = int32(v)
			x3, x2, x1 = x2, x1, v
		}
	case 4:
		x1, x2, x3, x4 := int64(x[3]), int64(x[2]), int64(x[1]), int64(x[0])
		for i, r := range out {
			v := int64(r + int32(4*(x1+x3)-6*x2-x4))
			out[i] = int32(v)
			x4, x3, x2, x1 = x3, x2, x1, v
		}
	}
}

// restoreLPC restores x[len(c):] in place from the residual it holds, with
// the quantised linear predictor c and shift (RFC 9639, section 9.2.6):
// sample i is its residual plus (Σ c[j]·x[i-1-j]) >> shift, the sum in 64
// bits. On amd64 an assembly loop per order (lpc_amd64.s) runs every
// order; elsewhere orders up to maxUnrolled run a loop written out for the
// order in Go (lpc_orders.go). restoreLPCPlain is the reference for all of
// them.
func restoreLPC(x []int32, c []int32, shift uint) {
	if !lpcKernel(x, c, shift) {
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
