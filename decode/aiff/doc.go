// Package aiff decodes AIFF and AIFF-C files for kweigh.
//
// AIFF is Apple's Audio Interchange File Format (version 1.3, 1989); AIFF-C
// its extension with a compression type (Apple's AIFF-C draft, 1991). Both
// are IFF files: a "FORM" chunk of type "AIFF" or "AIFC" holding chunks with
// big-endian sizes, each padded to an even length. Two matter here: COMM
// (channels, sample frames, sample size and the sample rate as an 80-bit
// IEEE 754 extended float) and SSND (offset, block size, then the sample
// frames). Everything else is skipped.
//
// Supported codings: big-endian two's-complement PCM of 1 to 32 bits (AIFF,
// and AIFF-C "NONE" or "twos"), little-endian PCM ("sowt"), and big-endian
// IEEE floats ("fl32"/"FL32", "fl64"/"FL64"). Other AIFF-C compression types
// (µ-law, A-law, IMA ADPCM, MACE …) are reported as *decode.UnsupportedError
// naming the type. A sample size that is not a multiple of 8 is stored
// left-justified in whole bytes (AIFF 1.3, "Sample Points"), so samples are
// scaled by their container width: integer full scale is ±1.
//
// AIFF says nothing about loudspeaker positions, so Info.Layout is nil and
// callers fall back to decode.DefaultLayout.
//
// Decoding streams: ReadFrames converts the sample frames of the SSND chunk
// straight from a read-only mapping of a regular file, a bounded window at
// a time, and block by block through a fixed-size buffer from other
// sources. A file whose SSND chunk holds
// fewer frames than COMM declares yields the frames it has, then a
// *decode.IntegrityError.
package aiff
