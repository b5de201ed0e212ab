// Package mp3 decodes MPEG-1 and MPEG-2 Audio Layer III (ISO/IEC 11172-3,
// ISO/IEC 13818-3) files for kweigh's loudness measurement. Importing it
// registers the "mp3" format with package decode.
//
// The Layer III decoding itself is done by github.com/hajimehoshi/go-mp3;
// this package wraps it so that the engine is handed the audio the file
// really holds:
//
//   - Channels. go-mp3 always outputs 16-bit stereo and copies a mono stream
//     into both channels. Measured as stereo, such a file would read
//     10·log10(2) = 3.01 LU too loud (BS.1770 sums the channel powers). The
//     channel mode is read from the frame header and a mono stream is
//     delivered as one channel.
//
//   - Gapless trimming. An encoder delays the signal (lame 3.100: 576
//     samples) and pads the last frame; the decoder's synthesis filter banks
//     add SynthesisDelay (529) samples. Encoders that know this write an
//     Xing/Info frame with an encoder extension holding the delay and the
//     padding (see xing.go). That frame carries no audio and is not decoded;
//     delay + SynthesisDelay samples are dropped from the start and the
//     stream is cut to frames × samples per frame − delay − padding, so the
//     decoded audio lines up with the encoder's input. Without that
//     information nothing is trimmed and a note says so.
//
//   - The stream decides. New walks the frame headers of the whole stream
//     once (a buffered pass, headers only parsed) before the first sample:
//     the length, the bit rate and the bit-rate mode come from the frames
//     found, and the Xing/Info header's delay and padding are applied only
//     when its frame count agrees with them. A header that declares fewer
//     frames than the stream holds would otherwise hide the rest of the
//     programme; every frame is measured and a note gives both counts.
//
//   - Clipping. go-mp3 limits its output to ±32767. Samples at that limit
//     reached or exceeded full scale; they are counted and reported through
//     Notes, because the true peak of such a file is above what is measured.
//     Samples are scaled by 1/32767, the inverse of go-mp3's own scaling,
//     so the limit maps to exactly ±1.
//
//   - Framing. Tags (ID3v2 at the start; APEv2, Lyrics3v2, ID3v1 at the end)
//     are skipped, and go-mp3 is fed only whole frames that belong to the
//     stream, walked by this package. Bytes that are not frames, a cut-short
//     last frame, fewer frames than the Xing header declares, or a decoder
//     failure (including a panic inside go-mp3) end the stream with a
//     *decode.IntegrityError naming the byte offset, after every frame that
//     decoded has been delivered.
//
//   - Scope. MPEG-2.5 (8, 11.025, 12 kHz), free-format streams (bit-rate
//     index 0) and layers I and II are recognised by Match but rejected by
//     New with a *decode.UnsupportedError.
//
// Decoding streams frame by frame: memory does not grow with the length of
// the file. (go-mp3 is given a plain io.Reader, not a Seeker, so that it
// does not build its own table of every frame's offset.)
package mp3
