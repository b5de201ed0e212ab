// Package layer3 holds the parts of kweigh's own MPEG audio Layer III
// decoder (ISO/IEC 11172-3, ISO/IEC 13818-3 and the MPEG-2.5 extension),
// written from the standards so that decoding MP3 no longer depends on a
// library that is slow, clamps at full scale and outputs 16 bits.
//
// It is not yet a decoder: package mp3 still decodes with
// github.com/hajimehoshi/go-mp3, and nothing outside the tests calls this
// package. What is here is each checked on its own:
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
//     32-point DCT-II (Lee's factorisation, 80 multiplications instead of
//     2048) and its windowing as a 16-term sum per sample over a ring of
//     V blocks, with the window passed in (checked against the standard's
//     step-by-step procedure for arbitrary windows).
//   - imdct36, imdct12, hybridBlock: the IMDCT as a DCT-IV through a
//     9-point (3 × 3) or 3-point complex DFT, with the block-type windows
//     and the short-block overlap.
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
// Missing before the decoder can be assembled and registered: the 512
// coefficients of the synthesis window (ISO/IEC 11172-3 Annex B, Table
// 3-B.3). They are data printed in the standard that could not be written
// out reliably from memory (a recall gave 226 of the first 257 values,
// each a plausible multiple of 2⁻¹⁶, with the rest lost), and must be
// typed in from the document (synthesis.run takes it as a parameter).
// After it: intensity stereo
// (MPEG-1 tan(is_pos·π/12) ratios, MPEG-2 intensity_scale positions), the
// bit reservoir across frames (walkGranules in the tests shows the
// accounting), the frame loop with CRC checks, and the differential tests
// against go-mp3 and `lame --decode` that must pass before package mp3
// switches over; they also settle the one unconfirmed Huffman entry (table
// 15, see bigValueCodes).
package layer3
