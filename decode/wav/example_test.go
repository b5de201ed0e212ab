package wav_test

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/wav" // registers the WAVE family
)

// ExampleNew decodes a tiny 16-bit stereo WAV held in memory: four frames
// at 48 kHz, as a fictional test-bench jig at Kestrel Lane Studios might
// write it. decode.New detects the format from its content.
func ExampleNew() {
	le := binary.LittleEndian
	var f bytes.Buffer
	f.WriteString("RIFF")
	binary.Write(&f, le, uint32(36+16)) // form size: WAVE + fmt + data
	f.WriteString("WAVEfmt ")
	binary.Write(&f, le, []uint32{16})
	binary.Write(&f, le, []uint16{1, 2})             // PCM, 2 channels
	binary.Write(&f, le, []uint32{48000, 48000 * 4}) // rate, byte rate
	binary.Write(&f, le, []uint16{4, 16})            // block align, bits
	f.WriteString("data")
	binary.Write(&f, le, uint32(16))
	binary.Write(&f, le, []int16{0, 0, 16384, -16384, 32767, -32768, -8192, 8192})

	d, err := decode.New(bytes.NewReader(f.Bytes()))
	if err != nil {
		fmt.Println(err)
		return
	}
	info := d.Info()
	fmt.Printf("%s %s, %d Hz, %d channels, %d bits, %d frames\n",
		info.Container, info.Codec, info.SampleRate, info.Channels, info.BitsPerSample, info.Frames)
	buf := make([]float64, 2*info.Channels)
	for {
		n, err := d.ReadFrames(buf)
		for i := range n {
			fmt.Printf("L %+.6f  R %+.6f\n", buf[2*i], buf[2*i+1])
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			fmt.Println(err)
			return
		}
	}
	// Output:
	// wav pcm, 48000 Hz, 2 channels, 16 bits, 4 frames
	// L +0.000000  R +0.000000
	// L +0.500000  R -0.500000
	// L +0.999969  R -1.000000
	// L -0.250000  R +0.250000
}
