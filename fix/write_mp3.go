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

// writeWAV24 writes the chain's samples (already dithered to 24 bits) as
// a plain 24-bit PCM WAV: the intermediate handed to the MP3 encoder, and
// the file written for the user when there is no encoder. Not float:
// Debian's lame 3.100 misreads 32-bit float WAV input (a -12 LUFS sine came
// out at -0.4 LUFS, clipped; tried while writing this package), and 24-bit
// PCM is what every encoder reads.
func writeWAV24(w io.Writer, c *chain) (int64, error) {
	ch, rate := c.info.Channels, c.info.SampleRate
	bw := bufio.NewWriterSize(w, 1<<16)
	if _, err := bw.Write(wav24Header(ch, rate, -1)); err != nil {
		return 0, err
	}
	buf := make([]float64, chainFrames*ch)
	raw := make([]byte, chainFrames*ch*3)
	var frames int64
	for {
		n, err := c.ReadFrames(buf)
		for i, v := range buf[:n*ch] {
			code := int32(v * (1 << 23)) // exact: the chain quantized to 24 bits
			raw[3*i], raw[3*i+1], raw[3*i+2] = byte(code), byte(code>>8), byte(code>>16)
		}
		if _, werr := bw.Write(raw[:n*ch*3]); werr != nil {
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
	if frames*int64(ch)*3%2 == 1 {
		bw.WriteByte(0) // chunks are padded to an even size
	}
	if err := bw.Flush(); err != nil {
		return frames, err
	}
	if f, ok := w.(*os.File); ok {
		if _, err := f.WriteAt(wav24Header(ch, rate, frames), 0); err != nil {
			return frames, err
		}
	}
	return frames, nil
}

// wav24Header returns the 44-byte header of a 24-bit PCM WAV holding
// frames frames (-1: not known yet). Beyond 4 GiB of audio the sizes
// saturate at 0xFFFFFFFF, the streaming convention.
func wav24Header(ch, rate int, frames int64) []byte {
	le := binary.LittleEndian
	b := make([]byte, 44)
	data := uint32(0xFFFFFFFF)
	if n := frames * int64(ch) * 3; frames >= 0 && n < 0xFFFFFFFF-36 {
		data = uint32(n)
	}
	riff := data
	if data != 0xFFFFFFFF {
		riff = data + 36 + data&1
	}
	copy(b[0:], "RIFF")
	le.PutUint32(b[4:], riff)
	copy(b[8:], "WAVEfmt ")
	le.PutUint32(b[16:], 16)
	le.PutUint16(b[20:], 1) // PCM
	le.PutUint16(b[22:], uint16(ch))
	le.PutUint32(b[24:], uint32(rate))
	le.PutUint32(b[28:], uint32(rate*ch*3))
	le.PutUint16(b[32:], uint16(ch*3))
	le.PutUint16(b[34:], 24)
	copy(b[36:], "data")
	le.PutUint32(b[40:], data)
	return b
}

// standardBitRates are the MPEG-1 and MPEG-2 layer III bit rates in kb/s
// (ISO/IEC 11172-3 and 13818-3, from memory).
var standardBitRates = []int{8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160, 192, 224, 256, 320}

// lameArgs returns the encoder arguments that reproduce the input's coding:
// constant bit rate at the input's (average) rate rounded to the nearest
// standard one, the input's channel mode and sample rate, lame's default
// quality. lame 3.100 scales its input down (by 0.95 at 160 kb/s and below;
// README "Formats"); the passes measure the encoded file and correct for it.
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
	return []string{"--silent", "--noreplaygain", "-b", strconv.Itoa(best), "--cbr", "-m", mode,
		"--resample", rate, in, out}
}

// lameScaleDB is the level change lame 3.100 makes on its own at a
// constant bit rate (README "Formats": ×0.95 up to 160 kb/s, ×0.97 at 192,
// ×0.98 at 224; measured by this project), which fix aims the PCM above to
// undo; a re-encode that still misses is corrected by measurement.
func lameScaleDB(info decode.Info) float64 {
	switch kbps := info.BitRate / 1000; {
	case kbps <= 168:
		return 20 * math.Log10(0.95)
	case kbps <= 208:
		return 20 * math.Log10(0.97)
	case kbps <= 240:
		return 20 * math.Log10(0.98)
	}
	return 0
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
