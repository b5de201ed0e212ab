// Package layer3 holds the parts of kweigh's own MPEG audio Layer III
// decoder (ISO/IEC 11172-3, ISO/IEC 13818-3 and the MPEG-2.5 extension),
// written from the standards so that decoding MP3 no longer depends on a
// library that is slow, clamps at full scale and outputs 16 bits.
//
// Decoder (frame.go) assembles the parts below into a frame-by-frame
// decoder: CRC-16 check when the frame carries one, the bit reservoir
// (main_data_begin reaching into earlier frames), joint stereo (M/S and
// intensity, MPEG-1 ratios and the MPEG-2 intensity_scale positions,
// stereo.go), and a damaged frame decoded as silence and reported as a
// *Damage without losing the timing. Package mp3 decodes with it. Its
// parts are each checked on their own:
//
//   - bitReader: MSB-first fields through a 64-bit register (against the
//     bit-by-bit definition).
//   - ParseHeader, parseSideInfo: frame header and side information for
//     MPEG-1 (two granules, scfsi) and the lower sampling frequencies (one
//     granule, 9-bit scalefac_compress), including the implicit region
//     counts of window-switched blocks.
//   - readMPEG1, readLSF: scale factors, with the MPEG-2 slen tables and
//     their intensity-stereo variant for the right channel.
//   - Huffman decoding, table-driven (a root table of up to 8 bits and
//     second-level tables): every big_values table (0–31, linbits
//     included) and count1 tables A and B, region boundaries from the
//     scale-factor band tables.
//   - requantise: |is|^(4/3) and 2^(e/4) by table (no math.Pow per line).
//   - matrix, synthesis: the polyphase synthesis, its matrixing as one
//     32-point DCT-II (a matrix product over the subbands up to the last
//     non-zero one, checked against Lee's factorisation and the defining
//     64×32 product) and its windowing as a 16-term sum per sample over a
//     ring of V blocks, with the window passed in (checked against the
//     standard's step-by-step procedure for arbitrary windows).
//   - imdctLong, imdct12, hybridBlock: the long blocks' IMDCT as one
//     product with the block type's window folded into the matrix
//     (checked against a DCT-IV through a 3 × 3 complex DFT, kept in the
//     tests), the short blocks' through a 3-point complex DFT, and the
//     short-block overlap.
//   - Kernels: the matrixing, the synthesis sums and the long-block IMDCT
//     run on AVX2 (synth_amd64.go, *_avx2_amd64.s) where the CPU has it,
//     with Go twins doing the same products in the same order, no fused
//     multiply-adds: the *KernelTwins tests require the same bits, and
//     -tags purego or KWEIGH_KERNELS=go run the Go code.
//   - midSide, reorder, aliasReduce, hybrid: M/S stereo, short-block
//     reordering, the alias-reduction butterflies, and the hybrid filter
//     bank with overlap-add and frequency inversion (checked against their
//     definitions and invariants: rotations keep energy, reordering is the
//     defined permutation).
//
// The checks are independent of this package's own formulas: decoding
// lame's streams must end every granule exactly on the length the encoder
// wrote (part2_3_length) — a strong test of the side information, the
// scale factors, the band tables and the code lengths of every Huffman
// table used — and the arithmetic parts are compared with the standard's
// defining sums. One thing these checks cannot see: two codewords of the
// same length assigned to each other's (x, y) values. That is left to the
// differential PCM tests against go-mp3 and lame, which need the whole
// decoder.
//
// The window (Window, window_table.go) is measured, not typed in: up to
// the window this package computes everything itself, and the output is
// linear in the 512 coefficients, so least squares over the output of an
// independent reference decoder (ffmpeg's, used as a decoder only) gives
// them to about 10⁻⁷; they are multiples of 2⁻¹⁶ as the standard prints
// them, and symmetric (TestMeasureWindow, which regenerates the table
// with -update).
//
// The assembled decoder is held to independent decoders: every sample of
// 12 lame encodes (MPEG-1, 2 and 2.5, CBR, VBR, ABR, mono, stereo, joint)
// and of the committed fixtures agrees with ffmpeg's float output within
// 10⁻⁵ (TestAgainstReferenceFloat), and package mp3 compares with lame
// --decode and go-mp3. These tests found two errors of the tables from
// memory (table 11's (0, 1)/(1, 0) codewords; confirmed the table 15
// entry) and one place where decoders differ (the 24 kHz band boundary,
// see longBands). lame writes no intensity stereo: MPEG-1 intensity is
// checked against ffmpeg on lame streams whose joint frames get the
// intensity bit set (TestIntensityAgainstReference); the MPEG-2 variant
// is checked only by construction.
//
// Free-format frames (bitrate_index 0) are refused (ErrFreeFormat).
package layer3
