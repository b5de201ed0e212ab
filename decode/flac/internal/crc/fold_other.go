//go:build purego || !amd64

package crc

// hasFold is false: this build has no folding kernel.
const hasFold = false

// fold16 is never called in this build (hasFold is false); it exists so
// Update16 reads the same on every platform.
func fold16(p []byte, crc uint16, keys *[2]uint64, out *[16]byte) {
	panic("crc: fold16 without the amd64 kernel")
}
