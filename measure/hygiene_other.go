//go:build !amd64 || purego

package measure

// hygieneAVX2 is false: no assembly here.
var hygieneAVX2 = false

// haveHygieneAVX2 is false: no assembly here.
var haveHygieneAVX2 = false

// hygieneAVX512 and haveHygieneAVX512 are false: no assembly here.
var hygieneAVX512, haveHygieneAVX512 = false, false

// stereoStretch is stereoStretchGo.
func stereoStretch(seg []float64, s *pairSums, full uint64) bool {
	return stereoStretchGo(seg, s, full)
}

// anyStretch is anyStretchGo on the state block st.
func anyStretch(buf, out []float64, st *frameState) bool {
	return anyStretchGo(buf, out, st.sums[:st.channels], st.gains[:], &st.pair, int(st.left), int(st.right), st.full)
}
