package flac_test

import (
	"fmt"
	"io"
	"log"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/flac"
)

// Decode a 5.1 FLAC file through the decode registry (importing package
// flac registers it) and read its samples block by block. The fixture is a
// synthetic tone per channel made by testdata/make-fixtures.sh.
func Example() {
	f, err := decode.Open("testdata/surround51-16-44k.flac")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	info := f.Info()
	fmt.Println(info.Container, info.SampleRate, "Hz", info.BitsPerSample, "bit", info.Layout)

	buf := make([]float64, 4096*info.Channels)
	var frames int
	for {
		n, err := f.ReadFrames(buf)
		frames += n
		if err == io.EOF {
			break
		}
		if err != nil {
			log.Fatal(err) // an *decode.IntegrityError names the damage
		}
	}
	fmt.Println(frames, "frames, MD5 verified:", f.Decoder.(*flac.Decoder).MD5Verified())
	// Output:
	// flac 44100 Hz 16 bit [L R C LFE Ls Rs]
	// 22050 frames, MD5 verified: true
}

// Turn MD5 verification off for one file opened through package decode,
// e.g. from a command-line flag; frame CRCs are still checked.
func Example_skipMD5() {
	f, err := decode.OpenWith("testdata/mono8-8k.flac", decode.Options{SkipMD5: true})
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	fmt.Println(f.Notes())
	// Output:
	// [FLAC MD5 verification turned off: only the frame checksums were checked]
}

// A damaged file (one bit flipped in the middle of stereo24-48k.flac, see
// testdata/README.md) is decoded to its end: the frame that fails its
// checksum is skipped, the frames after it are delivered, and the error
// that comes with the last of them says what was lost.
func Example_damaged() {
	f, err := decode.Open("testdata/stereo24-48k-bitflip.flac")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	buf := make([]float64, 4096*f.Info().Channels)
	var frames int
	for {
		n, err := f.ReadFrames(buf)
		frames += n
		if err == io.EOF {
			break
		}
		if err != nil {
			fmt.Println(err)
		}
	}
	fmt.Println(frames, "of", f.Info().Frames, "frames delivered")
	// Output:
	// damaged flac file at byte 33330: frame 3 at byte 33330: frame CRC-16 is 0x17a4, computed 0x2a51; resumed at the next valid frame, byte 43582: 4096 samples per channel (0.085 s) lost
	// 24704 of 28800 frames delivered
}
