// Package mp3 decodes MPEG-1, MPEG-2 and MPEG-2.5 Audio Layer III
// (ISO/IEC 11172-3, ISO/IEC 13818-3) files for kweigh's loudness
// measurement. Importing it registers the "mp3" format with package
// decode.
//
// The Layer III decoding itself is kweigh's own (package
// internal/layer3), written from the standards: float64 output that is
// never clamped (decoded overs above full scale are kept, so true peaks
// are true), a mono stream as one channel (measured as stereo it would
// read 10·log10(2) = 3.01 LU too loud), no allocation per frame. It
// replaced github.com/hajimehoshi/go-mp3 (16-bit, clamped, mono doubled),
// which stays as a test oracle. Around it this package makes sure the
// engine is handed the audio the file really holds:
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
//   - Framing. Tags (ID3v2 at the start; APEv2, Lyrics3v2, ID3v1 at the end)
//     are skipped, and the decoder is given only whole frames that belong
//     to the stream, walked by this package: a frame is taken when its
//     header belongs to the stream and the next header is where its length
//     says. Bytes that are not frames (or a header whose length runs over
//     the next frame) are skipped when frames of the stream link up again
//     after them (resync: a chain of headers of the stream): decoding goes
//     on there with the bit reservoir emptied, and the stretches skipped,
//     with their bytes and an estimate of the frames and seconds they
//     held, are reported in the one *decode.IntegrityError after the last
//     frame. A cut-short last frame, another stream, or junk with no frames
//     after it while the Xing header declares more end the stream with a
//     *decode.IntegrityError naming the byte offset.
//
//   - Damaged frames. A frame whose CRC (when present) fails, whose main
//     data lies in frames that are not there (bit reservoir) or whose
//     granules overrun their data is decoded as silence where its data was
//     bad, so the timing of the rest holds; decoding goes on, and after
//     the last frame one *decode.IntegrityError counts the damaged frames
//     and names the first.
//
//   - Sections. The decoder implements decode.Splitter (section.go): a
//     section decodes from a few frames before its start (the reservoir's
//     reach plus two frames for the filter banks) and drops them, so a
//     long file is measured on several cores with the samples of one
//     pass, bit for bit. A stream whose walk found damage is not split.
//
//   - Scope. Free-format streams (bit-rate index 0) and layers I and II
//     are recognised by Match but rejected by New with a
//     *decode.UnsupportedError.
//
// Decoding streams frame by frame: memory does not grow with the length of
// the file.
package mp3
