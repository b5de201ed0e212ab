// Package flac decodes FLAC streams (Free Lossless Audio Codec, RFC 9639)
// for kweigh. It is written from the specification; github.com/mewkiz/flac
// serves only as a test oracle.
//
// Importing the package registers the "flac" format with package decode.
// What a loudness checker needs from it:
//
//   - everything RFC 9639 allows: 4 to 32 bits per sample, 1 to 8
//     channels, every block size, fixed and variable blocking, constant,
//     verbatim, fixed-predictor and LPC subframes up to order 32, the three
//     stereo decorrelation modes, wasted bits, Rice partitions with 4- or
//     5-bit parameters and escaped partitions. A 32-bit stream's side
//     channel needs 33 bits and is decoded through 64-bit samples
//     (wide.go);
//   - streaming: frames are decoded one at a time from a sliding input
//     buffer (input.go) into per-channel buffers reused for every frame and
//     then into the caller's float64 block, so memory stays flat however
//     long the file is and decoding allocates nothing per frame;
//   - integrity: every frame's CRC-8 and CRC-16 (table driven,
//     internal/crc); the MD5 signature in STREAMINFO (the MD5 of the
//     decoded samples, little-endian, ceil(bits/8) bytes each, interleaved)
//     recomputed while decoding and compared at the end; frame headers that
//     contradict STREAMINFO, samples beyond the stream's bit depth and a
//     stream shorter than STREAMINFO declares are damage too;
//   - resynchronisation: after a damaged frame the decoder searches for the
//     next frame whose sync code, CRC-8, frame or sample number (it must
//     continue the stream) and CRC-16 all hold, and goes on from there. The
//     samples lost are counted from the frame numbers. The good frames
//     after the damage are delivered; the *decode.IntegrityError that
//     describes every damaged stretch (where, what, how many samples and
//     seconds were lost) comes with the last of them, then io.EOF. With more
//     than one stretch the notes list each;
//   - channel layout: FLAC's defined channel order per channel count, or the
//     WAVEFORMATEXTENSIBLE_CHANNEL_MASK Vorbis comment when present;
//   - an ID3v2 tag in front of the stream is skipped; bytes after a complete
//     stream that hold no frame (an ID3v1 tag, say) are noted and ignored;
//   - sections: the decoder is a decode.Splitter, so package measure can
//     measure one long file on several cores. A section finds the frame
//     holding its first sample through the seek table or by bisection on
//     verified frames, and the MD5 is checked across the sections in order
//     with bounded memory (section.go).
//
// Speed comes from a 64-bit bit reader refilled eight bytes at a time
// (internal/bitstream), unary codes counted with one leading-zero count
// (the Rice loop in assembly with LZCNT and BMI2 where the CPU has them),
// CRC-16 sliced sixteen bytes at a time (folded by carry-less
// multiplication where the CPU has PCLMULQDQ), LPC loops for every order
// with the newest samples kept in registers (assembly for orders 1 to 8
// and 13 to 32, Go for 9 to 12; lpc_orders.go and lpc_amd64.s generated
// by lpcgen.go), and the stereo decorrelation done in the same pass as
// the MD5 layout. Each fast kernel has a plain twin the tests hold it to,
// and -tags purego builds the Go code only.
//
// MD5 verification is on by default; NewDecoder takes Options, and the
// registered decoder follows decode.Options.SkipMD5, given per call to
// decode.OpenWith or decode.NewWith.
package flac
