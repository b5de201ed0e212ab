package fix

import (
	"bufio"
	"context"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// writeFloatWAV writes the chain's samples as a plain 32-bit IEEE float
// WAV (format tag 3, with a fact chunk): the intermediate handed to an MP3
// encoder, and the file written for the user when no encoder is present.
// Float needs no dither and keeps overs, so nothing is lost before the
// encoder.
func writeFloatWAV(w io.Writer, c *chain) (int64, error) {
	ch, rate := c.info.Channels, c.info.SampleRate
	bw := bufio.NewWriterSize(w, 1<<16)
	// The sizes are patched at the end when w can seek; a pipe gets the
	// streaming convention of 0xFFFFFFFF.
	hdr := floatWAVHeader(ch, rate, -1)
	if _, err := bw.Write(hdr); err != nil {
		return 0, err
	}
	buf := make([]float64, chainFrames*ch)
	raw := make([]byte, chainFrames*ch*4)
	var frames int64
	for {
		n, err := c.ReadFrames(buf)
		for i, v := range buf[:n*ch] {
			binary.LittleEndian.PutUint32(raw[4*i:], math.Float32bits(float32(v)))
		}
		if _, werr := bw.Write(raw[:n*ch*4]); werr != nil {
			return frames, werr
		}
		frames += int64(n)
		if err == io.EOF {
			break
		}
		if err != nil {
			return frames, err
		}
	}
	if err := bw.Flush(); err != nil {
		return frames, err
	}
	if f, ok := w.(*os.File); ok {
		if _, err := f.WriteAt(floatWAVHeader(ch, rate, frames), 0); err != nil {
			return frames, err
		}
	}
	return frames, nil
}

// floatWAVHeader returns the 58-byte header of a float WAV holding frames
// frames (-1: unknown). Above 4 GiB of audio the RIFF sizes saturate.
func floatWAVHeader(ch, rate int, frames int64) []byte {
	le := binary.LittleEndian
	b := make([]byte, 58)
	data := uint32(0xFFFFFFFF)
	if frames >= 0 && frames*int64(ch)*4 < 0xFFFFFFFF-50 {
		data = uint32(frames * int64(ch) * 4)
	}
	riff := data
	if data != 0xFFFFFFFF {
		riff = data + 50
	}
	copy(b[0:], "RIFF")
	le.PutUint32(b[4:], riff)
	copy(b[8:], "WAVEfmt ")
	le.PutUint32(b[16:], 18)
	le.PutUint16(b[20:], 3) // WAVE_FORMAT_IEEE_FLOAT
	le.PutUint16(b[22:], uint16(ch))
	le.PutUint32(b[24:], uint32(rate))
	le.PutUint32(b[28:], uint32(rate*ch*4))
	le.PutUint16(b[32:], uint16(ch*4))
	le.PutUint16(b[34:], 32)
	le.PutUint16(b[36:], 0) // cbSize
	copy(b[38:], "fact")
	le.PutUint32(b[42:], 4)
	le.PutUint32(b[46:], uint32(max(frames, 0)))
	copy(b[50:], "data")
	le.PutUint32(b[54:], data)
	return b
}

// standardBitRates are the MPEG-1 and MPEG-2 layer III bit rates in kb/s
// (ISO/IEC 11172-3 and 13818-3, from memory).
var standardBitRates = []int{8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160, 192, 224, 256, 320}

// lameArgs returns the encoder arguments that reproduce the input's coding:
// constant bit rate at the input's (average) rate rounded to the nearest
// standard one, the input's channel mode and sample rate, and no scaling
// (lame's own default scaling would change the level we just set).
func lameArgs(info decode.Info, in, out string) []string {
	kbps := info.BitRate / 1000
	best := standardBitRates[0]
	for _, r := range standardBitRates {
		if abs(r-kbps) < abs(best-kbps) {
			best = r
		}
	}
	mode := "j"
	switch strings.ToLower(info.Mode) {
	case "stereo":
		mode = "s"
	case "dual channel":
		mode = "d"
	case "mono", "single channel":
		mode = "m"
	}
	if info.Channels == 1 {
		mode = "m"
	}
	rate := strconv.FormatFloat(float64(info.SampleRate)/1000, 'f', -1, 64)
	return []string{"--silent", "--noreplaygain", "--scale", "1", "-b", strconv.Itoa(best), "--cbr", "-m", mode,
		"--resample", rate, "-q", "2", in, out}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// runLame encodes in (a WAV) to out with the lame at path.
func runLame(ctx context.Context, path string, info decode.Info, in, out string) error {
	cmd := exec.CommandContext(ctx, path, lameArgs(info, in, out)...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	if err := cmd.Run(); err != nil {
		return fmt.Errorf("lame failed: %v: %s", err, strings.TrimSpace(stderr.String()))
	}
	return nil
}
