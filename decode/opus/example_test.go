package opus_test

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/kweigh/kweigh/decode/opus"
)

// ExampleParseHead reads the identification header of a stereo file made
// by an encoder fed 44.1 kHz audio (RFC 7845 section 5.1 layout).
func ExampleParseHead() {
	h, err := opus.ParseHead([]byte("OpusHead\x01\x02\x38\x01\x44\xac\x00\x00\x00\x00\x00"))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(h.Channels, h.PreSkip, h.InputRate, h.Layout())
	// Output: 2 312 44100 [L R]
}

// ExampleNew opens a 0.1 s stereo file made by opusenc (see
// testdata/make-seeds.sh): the decoded length is the encoder's input
// length, 4800 samples at 48 kHz.
func ExampleNew() {
	f, err := os.Open(filepath.Join("testdata", "example-stereo.opus"))
	if err != nil {
		fmt.Println(err)
		return
	}
	defer f.Close()
	st, _ := f.Stat()
	d, err := opus.New(f, st.Size())
	if err != nil {
		fmt.Println(err)
		return
	}
	info := d.Info()
	fmt.Println(info.Codec, info.SampleRate, info.Channels, info.Layout, info.Frames)
	// Output: opus 48000 2 [L R] 4800
}
