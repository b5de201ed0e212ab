//go:build !purego

package crc

import "golang.org/x/sys/cpu"

// hasFold is true when the CPU has PCLMULQDQ and SSSE3's PSHUFB, which
// fold16 uses.
var hasFold = cpu.X86.HasPCLMULQDQ && cpu.X86.HasSSSE3

// fold16 folds p (a multiple of 16 bytes, at least 32), with crc XORed
// into its first two bytes (which continues a CRC from crc), into 16
// bytes whose CRC-16 from zero is that of p from crc: with X the 128-bit
// remainder so far, H and L its high and low 64 bits and D the next 16
// bytes, X·x^128 + D ≡ H·(x^192 mod P) + L·(x^128 mod P) + D (mod P), two
// carry-less multiplications and two XORs. Bytes are reversed on loading
// so the first bit of the message is bit 127. The table CRC is its twin
// (TestFoldMatchesTables).
//
//go:noescape
func fold16(p []byte, crc uint16, keys *[2]uint64, out *[16]byte)
