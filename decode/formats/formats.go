// Package formats registers every audio format kweigh reads with package
// decode. Import it for its side effect wherever files are opened (the
// command line, the engine, tests), so that every front end knows the same
// formats:
//
//	import _ "github.com/kweigh/kweigh/decode/formats"
//
// A new decoder package is added here, in one place.
package formats

import (
	_ "github.com/kweigh/kweigh/decode/aiff"
	_ "github.com/kweigh/kweigh/decode/external"
	_ "github.com/kweigh/kweigh/decode/flac"
	_ "github.com/kweigh/kweigh/decode/mp3"
	_ "github.com/kweigh/kweigh/decode/opus"
	_ "github.com/kweigh/kweigh/decode/wav"
)
