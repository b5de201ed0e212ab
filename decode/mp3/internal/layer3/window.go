package layer3

// Window is the polyphase synthesis window D[i] of ISO/IEC 11172-3 Annex
// B Table 3-B.3, from windowTable (the values are multiples of 2⁻¹⁶).
// Its scale makes full scale ±1 at the output.
var Window = func() (w [512]float64) {
	for i, v := range windowTable {
		w[i] = float64(v) / 65536
	}
	return w
}()
