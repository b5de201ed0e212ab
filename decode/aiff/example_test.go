package aiff_test

import (
	"fmt"
	"io"
	"log"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/aiff"
)

// Open an AIFF-C file through the decode registry (importing package aiff
// registers it) and read its samples. AIFF carries no channel layout, so
// Layout is nil and the caller falls back to decode.DefaultLayout.
func Example() {
	f, err := decode.Open("testdata/stereo16-44k-fl32.aifc")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	info := f.Info()
	fmt.Println(info.Container, info.Codec, info.SampleRate, "Hz", info.Channels, "channels, layout", info.Layout)

	buf := make([]float64, 1024*info.Channels)
	frames := 0
	for {
		n, err := f.ReadFrames(buf)
		frames += n
		if err == io.EOF {
			break
		}
		if err != nil {
			log.Fatal(err)
		}
	}
	fmt.Println(frames, "frames; default layout", decode.DefaultLayout(info.Channels))
	// Output:
	// aifc ieee-float 44100 Hz 2 channels, layout []
	// 8820 frames; default layout [L R]
}
