package external

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"time"

	"github.com/kweigh/kweigh/decode"
)

// maxProbeOutput bounds ffprobe's JSON: a file that lists more streams
// than fit is refused rather than read without limit.
const maxProbeOutput = 4 << 20

// probeStream is the part of one ffprobe stream entry the bridge uses.
type probeStream struct {
	Index            int               `json:"index"`
	CodecType        string            `json:"codec_type"`
	CodecName        string            `json:"codec_name"`
	Profile          string            `json:"profile"`
	SampleFmt        string            `json:"sample_fmt"`
	SampleRate       string            `json:"sample_rate"`
	Channels         int               `json:"channels"`
	ChannelLayout    string            `json:"channel_layout"`
	BitsPerSample    int               `json:"bits_per_sample"`
	BitsPerRawSample string            `json:"bits_per_raw_sample"`
	BitRate          string            `json:"bit_rate"`
	StartTime        string            `json:"start_time"`
	Duration         string            `json:"duration"`
	Tags             map[string]string `json:"tags"`
}

// probeFormat is the part of ffprobe's format entry the bridge uses.
type probeFormat struct {
	FormatName string            `json:"format_name"`
	NbStreams  int               `json:"nb_streams"`
	BitRate    string            `json:"bit_rate"`
	StartTime  string            `json:"start_time"`
	Duration   string            `json:"duration"`
	Tags       map[string]string `json:"tags"`
}

// probeResult is ffprobe's answer.
type probeResult struct {
	Streams []probeStream `json:"streams"`
	Format  probeFormat   `json:"format"`
}

// input says how a child reads the file: a regular file is handed over as
// descriptor 3 and opened again by name (/dev/fd/3), so ffmpeg can seek in
// it; any other Source is streamed to the child's stdin.
type input struct {
	file *os.File
	src  decode.Source
	size int64
}

func newInput(src decode.Source, size int64) input {
	if f, ok := src.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
			return input{file: f, size: size}
		}
	}
	return input{src: src, size: size}
}

// attach sets up cmd to read the input and returns the name to pass after
// -i. Extra files after the input start at descriptor 4.
func (in input) attach(cmd *exec.Cmd) string {
	if in.file != nil {
		cmd.ExtraFiles = append(cmd.ExtraFiles, in.file)
		return "/dev/fd/3"
	}
	cmd.ExtraFiles = append(cmd.ExtraFiles, nil) // keep descriptor numbers the same
	cmd.Stdin = io.NewSectionReader(in.src, 0, in.size)
	return "pipe:0"
}

// probe runs ffprobe on the input.
func probe(t *tools, kind Kind, in input, timeout time.Duration) (*probeResult, error) {
	ctx, cancel := context.WithTimeout(context.Background(), timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, t.ffprobe, "-v", "error", "-hide_banner",
		"-print_format", "json", "-show_format", "-show_streams")
	cmd.Args = append(cmd.Args, "-i", in.attach(cmd))
	childAttrs(cmd)
	var stdout, stderr bytes.Buffer
	out := &limited{buf: &stdout, max: maxProbeOutput + 1}
	cmd.Stdout = out
	cmd.Stderr = &limited{buf: &stderr, max: 4096}
	err := cmd.Run()
	if ctx.Err() != nil {
		return nil, &Error{Kind: kind,
			Problem: fmt.Sprintf("ffprobe did not answer within %v and was stopped", timeout)}
	}
	if stdout.Len() > maxProbeOutput {
		return nil, &Error{Kind: kind,
			Problem: fmt.Sprintf("ffprobe's description of the file exceeds %d MiB: far too many streams", maxProbeOutput>>20)}
	}
	if err != nil {
		msg := firstLine(stderr.String())
		if msg == "" {
			msg = err.Error()
		}
		return nil, &Error{Kind: kind, Problem: "ffprobe cannot read it: " + msg}
	}
	var r probeResult
	if err := json.Unmarshal(stdout.Bytes(), &r); err != nil {
		return nil, &Error{Kind: kind, Problem: "ffprobe's answer is not the JSON expected", Err: err}
	}
	return &r, nil
}

// audio returns the audio streams in file order.
func (r *probeResult) audio() []probeStream {
	var a []probeStream
	for _, s := range r.Streams {
		if s.CodecType == "audio" {
			a = append(a, s)
		}
	}
	return a
}

// atoi parses ffprobe's numbers given as strings ("N/A" and "" are 0).
func atoi(s string) int {
	n, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil {
		return 0
	}
	return n
}

// atof parses ffprobe's decimal numbers given as strings.
func atof(s string) (float64, bool) {
	f, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	return f, err == nil
}

// lossless are the codecs with a bit depth; every other codec the bridge
// reads is lossy and reports none.
func lossless(codec string) bool {
	if strings.HasPrefix(codec, "pcm_") {
		return true
	}
	switch codec {
	case "alac", "flac", "wavpack", "tta", "mlp", "truehd", "ape", "s302m":
		return true
	}
	return false
}
