package flac

// Options tune the decoder.
type Options struct {
	// VerifyMD5 recomputes the MD5 of the decoded samples and compares it
	// with the signature in STREAMINFO. It costs a few percent of decoding
	// time; turning it off leaves frame CRC checks as the only integrity
	// check.
	VerifyMD5 bool
}

// DefaultOptions are the options of a fresh process: MD5 verification on.
func DefaultOptions() Options { return Options{VerifyMD5: true} }
