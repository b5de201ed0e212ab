package decode

// Splitter is implemented by decoders whose audio can be read from any
// frame on (PCM in WAV, RF64 and AIFF; FLAC, which finds a frame by its
// seek table or by bisection on verified frame headers; MP3, which starts
// a few frames early for the bit reservoir and the filter-bank state and
// drops what it decoded before the section): package measure cuts a long
// file into sections and measures them on several cores at once.
type Splitter interface {
	// SplitFrames returns how many frames Section can reach: every frame
	// of the stream when it is sound, or 0 when it must be read in one
	// pass (damaged or truncated audio, whose report comes from ReadFrames
	// in order).
	SplitFrames() int64
	// Section returns a new decoder for frames [from, to) of the stream,
	// 0 ≤ from ≤ to ≤ SplitFrames(). It shares only the source, which it
	// reads with ReadAt (safe for concurrent use on an *os.File), and does
	// not move the decoder it came from; its Info is the whole stream's.
	Section(from, to int64) (Decoder, error)
}

// Splittable returns d's Splitter and true when d (or the decoder inside
// a *File) implements it.
func Splittable(d Decoder) (Splitter, bool) {
	if f, ok := d.(*File); ok {
		d = f.Decoder
	}
	s, ok := d.(Splitter)
	return s, ok
}

// SectionChecker is implemented by a Splitter whose stream carries a
// checksum of the whole audio in order (FLAC's MD5): its sections feed
// one running check, which needs them short enough that the audio waiting
// for it stays small, and which is read out once every section is done.
type SectionChecker interface {
	// MaxSectionFrames is the longest section the checker wants (0: no
	// limit), keeping the bytes that wait for the check bounded.
	MaxSectionFrames() int64
	// CheckSections, called after sections covering frames
	// [0, SplitFrames()) have all been read, returns nil when the check
	// holds, the *IntegrityError one pass would have ended with when it
	// fails, or another error when the sections did not cover the stream.
	CheckSections() error
}
