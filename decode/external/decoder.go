package external

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/kweigh/kweigh/decode"
)

// MaxChannels is the most channels one measurement through the bridge may
// have (all selected streams together): more are refused with a hint to
// pick a stream.
const MaxChannels = 64

// chunkBytes is the size of one read from a stream's pipe; queueChunks is
// how many chunks a stream may run ahead of the slowest one (4 MiB).
const (
	chunkBytes  = 32 << 10
	queueChunks = 128
)

// stream is one audio stream's pipe and what has been read from it.
type stream struct {
	channels int
	chunks   chan []byte
	pending  []byte
	eof      bool
	frames   int64
	reader   *os.File
}

// Decoder reads the audio of one file through ffmpeg. Close stops the child
// if it still runs.
type Decoder struct {
	info    decode.Info
	kind    Kind
	cmd     *exec.Cmd
	streams []*stream
	stderr  *limited
	notes   []string
	timeout time.Duration

	lastRead  atomic.Int64 // unix nanoseconds of the last bytes read
	timedOut  atomic.Bool
	stop      chan struct{}
	closeOnce sync.Once
	waitOnce  sync.Once
	waitErr   error
	exited    atomic.Bool
	killMu    sync.Mutex
	done      bool
	damage    error
	// probeSeconds is the duration ffprobe gives (0 when it gives none).
	probeSeconds float64
}

// New probes src (a container of the given kind, size bytes long) and
// starts ffmpeg on its audio streams.
func New(src decode.Source, size int64, kind Kind, opt decode.Options) (*Decoder, error) {
	t, err := findTools(kind, opt)
	if err != nil {
		return nil, err
	}
	timeout := opt.ChildTimeout
	if timeout <= 0 {
		timeout = DefaultTimeout
	}
	in := newInput(src, size)
	if in.file == nil && (kind == MP4 || kind == MOV) && indexAfterAudio(src, size) {
		return nil, &Error{Kind: kind, Problem: "its index (moov box) follows the audio (mdat), which ffmpeg cannot read from a stream; open it as a file"}
	}
	pr, err := probe(t, kind, in, timeout)
	if err != nil {
		return nil, err
	}
	audio := pr.audio()
	if len(audio) == 0 {
		what := "no streams at all"
		if len(pr.Streams) > 0 {
			kinds := map[string]int{}
			for _, s := range pr.Streams {
				kinds[s.CodecType]++
			}
			var parts []string
			for _, k := range slices.Sorted(func(yield func(string) bool) {
				for k := range kinds {
					if !yield(k) {
						return
					}
				}
			}) {
				parts = append(parts, fmt.Sprintf("%d %s", kinds[k], k))
			}
			what = "only " + strings.Join(parts, ", ") + " stream(s)"
		}
		return nil, &Error{Kind: kind, Problem: fmt.Sprintf("%s: it has %s", errNoAudio, what)}
	}
	chosen := audio
	if opt.Stream > 0 {
		if opt.Stream > len(audio) {
			return nil, fmt.Errorf("--stream %d: the file has %d audio stream(s)", opt.Stream, len(audio))
		}
		chosen = audio[opt.Stream-1 : opt.Stream]
	}
	d := &Decoder{kind: kind, stderr: &limited{buf: new(bytes.Buffer), max: 8192}, timeout: timeout, stop: make(chan struct{})}
	if err := d.describe(t, pr, audio, chosen, opt.Stream); err != nil {
		return nil, err
	}
	if err := d.start(t, in, chosen); err != nil {
		return nil, err
	}
	return d, nil
}

// describe fills Info and the notes from ffprobe's answer.
func (d *Decoder) describe(t *tools, pr *probeResult, audio, chosen []probeStream, selected int) error {
	kind := d.kind
	total := 0
	for _, s := range chosen {
		if s.Channels <= 0 {
			return &Error{Kind: kind, Problem: fmt.Sprintf("audio stream %d declares %d channels", s.Index, s.Channels)}
		}
		total += s.Channels
	}
	if total > MaxChannels {
		return &decode.UnsupportedError{Format: string(kind), What: fmt.Sprintf(
			"%d audio streams with %d channels in all; kweigh measures at most %d channels at once: choose one stream with --stream N", len(chosen), total, MaxChannels)}
	}
	rate := atoi(chosen[0].SampleRate)
	for _, s := range chosen[1:] {
		if r := atoi(s.SampleRate); r != rate {
			return &decode.UnsupportedError{Format: string(kind), What: fmt.Sprintf(
				"audio streams at %d and %d Hz cannot be one measurement: choose one with --stream N", rate, r)}
		}
	}
	if rate <= 0 {
		return &Error{Kind: kind, Problem: fmt.Sprintf("audio stream %d declares no sample rate", chosen[0].Index)}
	}
	var codecs []string
	bitRate := 0
	bits := 0
	allLossless := true
	float := false
	for _, s := range chosen {
		c := s.CodecName
		if p := s.Profile; p != "" && p != "unknown" {
			c += " " + p
		}
		if !slices.Contains(codecs, c) {
			codecs = append(codecs, c)
		}
		bitRate += atoi(s.BitRate)
		if !lossless(s.CodecName) {
			allLossless = false
			continue
		}
		b := atoi(s.BitsPerRawSample)
		if b == 0 {
			b = s.BitsPerSample
		}
		bits = max(bits, b)
		float = float || strings.HasPrefix(s.CodecName, "pcm_f")
	}
	if bitRate == 0 && len(chosen) == len(pr.Streams) {
		bitRate = atoi(pr.Format.BitRate)
	}
	if dur, ok := atof(chosen[0].Duration); ok {
		d.probeSeconds = dur
	} else if dur, ok := atof(pr.Format.Duration); ok {
		d.probeSeconds = dur
	}
	d.info = decode.Info{
		Container:    string(kind),
		Codec:        strings.Join(codecs, ", "),
		SampleRate:   rate,
		Channels:     total,
		Layout:       layoutOf(t, chosen),
		Frames:       -1,
		SampleFormat: decode.Float,
	}
	first := 1
	for i, s := range chosen {
		n := i + 1
		if selected > 0 {
			n = selected
		}
		c := s.CodecName
		if p := s.Profile; p != "" && p != "unknown" {
			c += " " + p
		}
		d.info.Streams = append(d.info.Streams, decode.StreamInfo{Index: n, FirstChannel: first, Channels: s.Channels, Layout: streamLabels(t, s), Codec: c})
		first += s.Channels
	}
	if allLossless {
		d.info.BitsPerSample = bits
		if !float {
			d.info.SampleFormat = decode.Int
		}
	} else {
		d.info.BitRate = bitRate // lossy: a bit rate, no bit depth
	}

	v := t.version
	if v == "" {
		v = "(version unknown)"
	}
	d.notes = append(d.notes, fmt.Sprintf("decoded by ffmpeg %s", v))
	switch {
	case selected > 0:
		d.notes = append(d.notes, fmt.Sprintf("audio stream %d of %d measured (--stream %d)", selected, len(audio), selected))
	case len(chosen) > 1:
		per := make([]string, len(chosen))
		for i, s := range chosen {
			per[i] = fmt.Sprintf("%d×%d", i+1, s.Channels)
		}
		d.notes = append(d.notes, fmt.Sprintf(
			"%d audio streams measured together as the %d channels of one programme, in stream order (stream×channels: %s); choose one with --stream N, or measure them as programmes of their own with groups named by stream (--groups 'main=s1,stereo=s2')",
			len(chosen), total, strings.Join(per, " ")))
	}
	tc := pr.Format.Tags["timecode"]
	for _, s := range pr.Streams {
		if tc == "" {
			tc = s.Tags["timecode"]
		}
	}
	if tc != "" {
		d.notes = append(d.notes, "timecode "+tc)
	}
	if st, ok := atof(chosen[0].StartTime); ok && st != 0 {
		d.notes = append(d.notes, fmt.Sprintf("audio starts at %.3f s of the file's timeline", st))
	}
	for _, s := range chosen {
		if s.CodecName == "ac3" || s.CodecName == "eac3" {
			d.notes = append(d.notes, "decoded without the decoder's dynamic range compression (drc_scale 0); dialnorm is not applied")
			break
		}
	}
	return nil
}

// ffmpegLabels maps ffmpeg's channel names to kweigh's labels (the names
// ffmpeg prints with -layouts; their order is that of the WAVE channel
// mask, which is the order ffmpeg's decoders deliver).
var ffmpegLabels = map[string]string{
	"FL": decode.FrontLeft, "FR": decode.FrontRight, "FC": decode.FrontCenter, "LFE": decode.LowFrequency,
	"BL": decode.BackLeft, "BR": decode.BackRight, "FLC": decode.FrontLeftInner, "FRC": decode.FrontRightInner,
	"BC": decode.BackCenter, "SL": decode.SurroundLeft, "SR": decode.SurroundRight, "TC": decode.TopCenter,
	"TFL": decode.TopFrontLeft, "TFC": decode.TopFrontCenter, "TFR": decode.TopFrontRight,
	"TBL": decode.TopBackLeft, "TBC": decode.TopBackCenter, "TBR": decode.TopBackRight,
}

// ffmpegMaskBit is each channel name's WAVE channel-mask bit.
var ffmpegMaskBit = map[string]uint{
	"FL": 0, "FR": 1, "FC": 2, "LFE": 3, "BL": 4, "BR": 5, "FLC": 6, "FRC": 7, "BC": 8,
	"SL": 9, "SR": 10, "TC": 11, "TFL": 12, "TFC": 13, "TFR": 14, "TBL": 15, "TBC": 16, "TBR": 17,
}

// streamLabels returns the labels of one stream's layout, or nil when
// ffmpeg names none (or names channels kweigh has no label for).
func streamLabels(t *tools, s probeStream) []string {
	if s.Channels == 1 {
		return []string{decode.Mono}
	}
	names, ok := t.layouts[s.ChannelLayout]
	if !ok && strings.Contains(s.ChannelLayout, "+") {
		names = strings.Split(s.ChannelLayout, "+")
	}
	if len(names) != s.Channels {
		return nil
	}
	var mask uint32
	last := -1
	for _, n := range names {
		bit, ok := ffmpegMaskBit[n]
		if !ok || int(bit) <= last {
			return nil // a channel without a label, or not in mask order
		}
		mask |= 1 << bit
		last = int(bit)
	}
	return decode.LayoutFromMask(mask, s.Channels)
}

// layoutOf returns the measurement's layout: one stream's own, two mono
// streams as L and R, or the streams' labels in order with mono streams
// (and streams of unknown layout) labelled by channel number.
func layoutOf(t *tools, chosen []probeStream) []string {
	if len(chosen) == 1 {
		return streamLabels(t, chosen[0])
	}
	if len(chosen) == 2 && chosen[0].Channels == 1 && chosen[1].Channels == 1 {
		return []string{decode.FrontLeft, decode.FrontRight}
	}
	var labels []string
	for _, s := range chosen {
		l := streamLabels(t, s)
		if s.Channels == 1 || l == nil {
			for range s.Channels {
				labels = append(labels, fmt.Sprintf("Ch%d", len(labels)+1))
			}
			continue
		}
		labels = append(labels, l...)
	}
	return labels
}

// start runs ffmpeg with one float pipe per chosen stream.
func (d *Decoder) start(t *tools, in input, chosen []probeStream) error {
	cmd := exec.Command(t.ffmpeg, "-nostdin", "-hide_banner", "-v", "error")
	for _, s := range chosen {
		if s.CodecName == "ac3" || s.CodecName == "eac3" {
			cmd.Args = append(cmd.Args, "-drc_scale", "0")
			break
		}
	}
	cmd.Args = append(cmd.Args, "-i", in.attach(cmd))
	var writers []*os.File
	closeAll := func() {
		for _, w := range writers {
			w.Close()
		}
		for _, s := range d.streams {
			s.reader.Close()
		}
	}
	for i, s := range chosen {
		r, w, err := os.Pipe()
		if err != nil {
			closeAll()
			return err
		}
		writers = append(writers, w)
		cmd.ExtraFiles = append(cmd.ExtraFiles, w)
		cmd.Args = append(cmd.Args, "-map", fmt.Sprintf("0:%d", s.Index), "-c:a", "pcm_f32le", "-f", "f32le",
			fmt.Sprintf("pipe:%d", 4+i))
		d.streams = append(d.streams, &stream{channels: s.Channels, chunks: make(chan []byte, queueChunks), reader: r})
	}
	cmd.Stderr = d.stderr
	childAttrs(cmd)
	if err := cmd.Start(); err != nil {
		closeAll()
		return &MissingError{Kind: d.kind, Program: t.ffmpeg, Err: err}
	}
	for _, w := range writers {
		w.Close() // the child holds its own copies
	}
	d.cmd = cmd
	d.lastRead.Store(time.Now().UnixNano())
	for _, s := range d.streams {
		go d.pump(s)
	}
	go d.watch()
	return nil
}

// pump reads one stream's pipe into its queue until the pipe closes.
func (d *Decoder) pump(s *stream) {
	defer close(s.chunks)
	for {
		buf := make([]byte, chunkBytes)
		n, err := io.ReadFull(s.reader, buf)
		if n > 0 {
			d.lastRead.Store(time.Now().UnixNano())
			select {
			case s.chunks <- buf[:n]:
			case <-d.stop:
				return
			}
		}
		if err != nil {
			return
		}
	}
}

// watch stops the child when it has produced nothing for the timeout.
func (d *Decoder) watch() {
	tick := time.NewTicker(min(d.timeout/4, time.Second))
	defer tick.Stop()
	for {
		select {
		case <-d.stop:
			return
		case <-tick.C:
			if time.Since(time.Unix(0, d.lastRead.Load())) > d.timeout {
				d.timedOut.Store(true)
				d.kill()
				return
			}
		}
	}
}

// Info returns the stream description.
func (d *Decoder) Info() decode.Info { return d.info }

// Notes returns what the bridge learnt: the ffmpeg version, how streams
// were combined, timecode, and streams of unequal length.
func (d *Decoder) Notes() []string { return d.notes }

// ReadFrames fills dst with interleaved frames of all chosen streams.
func (d *Decoder) ReadFrames(dst []float64) (int, error) {
	if d.done {
		return 0, io.EOF
	}
	want := len(dst) / d.info.Channels
	if want == 0 {
		return 0, nil
	}
	n := want
	for _, s := range d.streams {
		frameBytes := 4 * s.channels
		for len(s.pending) < frameBytes && !s.eof {
			c, ok := <-s.chunks
			if !ok {
				s.eof = true
				break
			}
			s.pending = append(s.pending, c...)
		}
		n = min(n, len(s.pending)/frameBytes)
	}
	if n == 0 {
		return 0, d.finish()
	}
	off := 0
	for _, s := range d.streams {
		p := s.pending
		for f := range n {
			base := f*d.info.Channels + off
			for c := range s.channels {
				i := 4 * (f*s.channels + c)
				dst[base+c] = float64(math.Float32frombits(binary.LittleEndian.Uint32(p[i:])))
			}
		}
		s.pending = s.pending[n*4*s.channels:]
		if len(s.pending) == 0 {
			s.pending = nil
		}
		s.frames += int64(n)
		off += s.channels
	}
	return n, nil
}

// finish ends the stream: it waits for the child and turns a timeout, a
// failed exit or anything on stderr into the file's damage.
func (d *Decoder) finish() error {
	d.done = true
	// The shortest stream ended; drain the others so ffmpeg can exit.
	var longer []string
	for i, s := range d.streams {
		extra := int64(len(s.pending) / (4 * s.channels))
		for c := range s.chunks {
			extra += int64(len(c) / (4 * s.channels))
		}
		if extra > 0 {
			longer = append(longer, fmt.Sprintf("stream %d by %.3f s", i+1, float64(extra)/float64(d.info.SampleRate)))
		}
	}
	if len(longer) > 0 {
		d.notes = append(d.notes, "audio streams of unequal length: measured to the end of the shortest; longer were "+strings.Join(longer, ", "))
	}
	err := d.wait()
	msg := firstLine(d.stderr.String())
	switch {
	case d.timedOut.Load():
		return &decode.IntegrityError{Format: string(d.kind), Offset: -1,
			Problem: fmt.Sprintf("ffmpeg produced no audio for %v and was stopped (stalled decoder)", d.timeout)}
	case msg != "":
		return &decode.IntegrityError{Format: string(d.kind), Offset: -1, Problem: "ffmpeg reported a decoding error: " + msg}
	case err != nil:
		return &decode.IntegrityError{Format: string(d.kind), Offset: -1, Problem: "ffmpeg failed: " + err.Error()}
	case d.streams[0].frames == 0 && d.probeSeconds > 0:
		return &decode.IntegrityError{Format: string(d.kind), Offset: -1,
			Problem: fmt.Sprintf("ffmpeg decoded no audio from a stream ffprobe says lasts %.3f s", d.probeSeconds)}
	}
	return io.EOF
}

// wait reaps the child once.
func (d *Decoder) wait() error {
	d.waitOnce.Do(func() {
		d.waitErr = d.cmd.Wait()
		d.killMu.Lock()
		d.exited.Store(true)
		d.killMu.Unlock()
		d.closeOnce.Do(func() { close(d.stop) })
		for _, s := range d.streams {
			s.reader.Close()
		}
	})
	return d.waitErr
}

// kill stops the child's whole process group.
func (d *Decoder) kill() {
	d.killMu.Lock()
	defer d.killMu.Unlock()
	if d.cmd != nil && d.cmd.Process != nil && !d.exited.Load() {
		killGroup(d.cmd) // never after Wait: the id may belong to another process by then
	}
}

// Close stops the child if it still runs and waits for it, so no process
// and no zombie outlives the decoder. It is safe to call more than once.
func (d *Decoder) Close() error {
	if d.cmd == nil {
		return nil
	}
	d.closeOnce.Do(func() { close(d.stop) })
	d.kill()
	d.wait()
	return nil
}

// indexAfterAudio reports whether an ISO/QuickTime file's top-level mdat
// box comes before its moov box (ISO/IEC 14496-12 section 4.2 box
// headers: 32-bit size, type, and a 64-bit size when the first is 1).
func indexAfterAudio(r io.ReaderAt, size int64) bool {
	var h [16]byte
	for off := int64(0); off+8 <= size; {
		if _, err := r.ReadAt(h[:8], off); err != nil {
			return false
		}
		n := int64(binary.BigEndian.Uint32(h[:4]))
		switch string(h[4:8]) {
		case "moov":
			return false
		case "mdat":
			return true
		}
		if n == 1 {
			if _, err := r.ReadAt(h[8:16], off+8); err != nil {
				return false
			}
			n = int64(binary.BigEndian.Uint64(h[8:16]))
		}
		if n < 8 {
			return false
		}
		off += n
	}
	return false
}
