package mp3_test

import (
	"errors"
	"fmt"
	"io"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/mp3" // registers "mp3"
)

// Example opens a mono MP3 (an invented podcast segment, 5 s of speech-like
// sound at 128 kbit/s), prints what the header says and counts the samples
// after the gapless trimming.
func Example() {
	f, err := decode.Open("testdata/speech-m44-128.mp3")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer f.Close()
	info := f.Info()
	fmt.Printf("%s, %s, %d Hz, %d channel (%s), %d kbit/s\n",
		info.Container, info.Codec, info.SampleRate, info.Channels, info.Mode, info.BitRate/1000)

	buf := make([]float64, 4096*info.Channels)
	var frames int64
	for {
		n, err := f.ReadFrames(buf)
		frames += int64(n)
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			fmt.Println(err)
			return
		}
	}
	fmt.Printf("%d samples = %.2f s, as the header declares: %v\n",
		frames, float64(frames)/float64(info.SampleRate), frames == info.Frames)
	fmt.Println("notes:", len(f.Notes()))
	// Output:
	// mp3, mpeg-1 layer 3, 44100 Hz, 1 channel (mono), 128 kbit/s
	// 220500 samples = 5.00 s, as the header declares: true
	// notes: 0
}

// Example_unsupported shows the message for a free-format file.
func Example_unsupported() {
	_, err := decode.Open("testdata/free-format.mp3")
	fmt.Println(err)
	// Output:
	// testdata/free-format.mp3: unsupported mp3: free-format bit rate (bit-rate index 0); the frame length cannot be read from the header
}
