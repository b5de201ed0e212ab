// Package opus decodes Ogg Opus files (RFC 7845) natively. The Ogg pages
// (RFC 3533) and the Opus identification header are read by kweigh's own
// code; the Opus packets themselves are decoded by
// github.com/thesyncim/gopus, a pure-Go port of the reference decoder.
//
// What the decoder does on top of the codec, as RFC 7845 asks:
//
//   - The header's pre-skip is dropped from the start (section 4.2).
//   - The end is trimmed to the last page's granule position (section 4.4),
//     so the decoded length is the encoder's input length.
//   - The header's output gain is applied (section 5.1).
//   - Channel mapping families 0 and 1 are decoded, and their channels are
//     labelled in Vorbis channel order (section 5.1.1.2; Vorbis I
//     specification section 4.3.9). Other families are refused clearly.
//   - Output is at 48 kHz, Opus's own rate; the input sample rate the header
//     declares is reported in a note.
//   - A chained file (one logical stream after another) is decoded link by
//     link when every link has the same channels; several Opus streams
//     multiplexed at once are refused; other logical streams (a video or a
//     skeleton track) are skipped with a note.
//   - Page CRCs are checked; a bad page or a packet the codec rejects marks
//     the file damaged.
package opus
