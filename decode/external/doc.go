// Package external reads the delivery formats kweigh does not decode itself
// (AAC in MP4/M4A/MOV or ADTS, ALAC, AC-3 and E-AC-3, Ogg Vorbis, the audio
// tracks of MXF and QuickTime files, Matroska/WebM) through the ffmpeg
// program, because no complete, trustworthy Go decoder for them exists.
//
// The bridge follows fixed rules, so that the PCM kweigh measures is the
// PCM the codec decodes and nothing else:
//
//   - The container is recognised by its magic bytes (Match), never by its
//     name. Without ffmpeg such a file is still recognised and the error
//     names the format and says that installing ffmpeg enables it.
//   - ffprobe (JSON output) lists the streams, their layouts, sample rates,
//     bit rates, profiles, start time and timecode.
//   - ffmpeg decodes the chosen audio streams to 32-bit float PCM, one pipe
//     per stream, read as they come: no temporary files, no resampling, no
//     channel remix, no filter of any kind (the only conversion ffmpeg
//     makes is the exact one from the decoder's sample format to
//     interleaved float). AC-3 and E-AC-3 are decoded with the dynamic
//     range compression scale at 0, so the measured PCM is the programme
//     without the decoder's compression.
//   - Several audio streams become the channels of one measurement, in
//     stream order; decode.Options.Stream selects one instead.
//   - Anything ffmpeg writes to stderr while decoding (it runs with -v
//     error) marks the file damaged; the audio decoded before is kept.
//   - The child runs in its own process group, is stopped when it produces
//     nothing for the child timeout, when the decoder is closed (which is
//     what a cancelled measurement does) and, on Linux, when kweigh dies;
//     it is always waited for, so no zombie is left.
package external
