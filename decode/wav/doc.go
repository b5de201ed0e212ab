// Package wav decodes the WAVE family of files: RIFF/WAVE, RF64 (EBU Tech
// 3306) and BW64 (ITU-R BS.2088), including Broadcast Wave (BWF) files with
// a bext chunk (EBU Tech 3285 v2).
//
// Importing the package for its side effect registers it with package
// decode:
//
//	import _ "github.com/kweigh/kweigh/decode/wav"
//
// The reader is hand-written and streaming. New walks the chunk list once,
// reading only chunk headers and the small fmt, ds64 and bext chunks; it
// seeks over everything else (audio included), so chunks may come in any
// order. ReadFrames then converts the data chunk of a regular file straight
// from a read-only mapping of it, a bounded window at a time (a file that
// shrinks while mapped is reported as damage, not a crash), and reads other
// sources in blocks through one reusable byte buffer; either way memory
// does not depend on the length of the file.
//
// Supported codings: PCM integer with 8 (unsigned), 16, 24 and 32-bit
// containers (any number of valid bits inside, e.g. 20-in-24), IEEE float
// with 32 or 64 bits, plain or as WAVE_FORMAT_EXTENSIBLE. Integers are
// scaled by 2^(container bits-1), so the most negative code is exactly -1.0
// and the low padding bits of a 20-in-24 file change nothing. Every other
// coding (µ-law, A-law, ADPCM, MPEG, big-endian RIFX, unknown SubFormat
// GUIDs) is refused with a *decode.UnsupportedError that names it.
//
// Float samples are passed on exactly as stored, including values beyond
// full scale and NaN or ±Inf: the decoder reports what the file holds, and
// the measuring layer refuses non-finite samples with its own error.
//
// Damage is reported, not hidden: a data chunk that is cut short delivers
// the frames that are there, then a *decode.IntegrityError saying how much
// audio is missing, then io.EOF. Broken headers give a *decode.FormatError
// carrying the byte offset.
package wav
