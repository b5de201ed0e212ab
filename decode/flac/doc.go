// Package flac decodes FLAC files (Free Lossless Audio Codec, Xiph.Org FLAC
// format specification, https://xiph.org/flac/format.html) for kweigh by
// wrapping github.com/mewkiz/flac.
//
// Importing the package registers the "flac" format with package decode. The
// wrapper adds what a loudness checker needs on top of the library:
//
//   - streaming: frames are decoded one at a time into the caller's buffer,
//     so memory stays flat however long the file is;
//   - integrity: the MD5 signature in STREAMINFO (the MD5 of the decoded
//     samples, little-endian, ceil(bits/8) bytes each, interleaved) is
//     recomputed while decoding and compared at the end; a mismatch, a frame
//     CRC error or a stream that ends early is an *decode.IntegrityError
//     returned after the frames that could be decoded;
//   - channel layout: FLAC's defined channel order per channel count, or the
//     WAVEFORMATEXTENSIBLE_CHANNEL_MASK Vorbis comment when present;
//   - a quiet standard logger: mewkiz/flac v1.0.14 logs a line per frame at
//     24 kHz and 176.4 kHz through package log; the first decoder wraps the
//     standard logger's output in a filter that drops exactly those lines
//     and forwards every other line unchanged (quiet_log.go);
//   - damage the library lets through is caught: frame headers that
//     contradict STREAMINFO, samples beyond the stream's bit depth, a stream
//     shorter than STREAMINFO declares;
//   - 32-bit FLAC (allowed since FLAC 1.4) is rejected as unsupported.
//
// MD5 verification is on by default; NewDecoder takes Options, and the
// registered decoder follows decode.Options.SkipMD5, given per call to
// decode.OpenWith or decode.NewWith.
//
// The file is opened by the caller (decode.Open) and read through
// flac.New, never flac.Open, whose Close does not close the file.
package flac
