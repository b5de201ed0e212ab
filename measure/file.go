package measure

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/timecode"
)

// Options tune a measurement. The zero value measures with the file's own
// layout and the default hygiene thresholds.
type Options struct {
	// Layout overrides the channel layout (labels in stream order) for
	// files whose header is wrong or silent about it; its length must match
	// the file's channel count.
	Layout []string
	// SilenceThresholdDBFS sets the silence level; 0 means
	// DefaultSilenceThresholdDBFS.
	SilenceThresholdDBFS float64
	// ClipRunMinSamples sets the shortest clipping run; 0 means
	// DefaultClipRunMinSamples.
	ClipRunMinSamples int
	// KeepSeries keeps the 10 Hz time series in Measurement.Series (for
	// plots). Their size is bounded: past 1 h 49 min the engine decimates
	// them (see loudness.Series).
	KeepSeries bool
	// StartTimecode is the timecode of the file's first sample
	// (HH:MM:SS:FF), overriding the bext TimeReference; empty means the
	// file's own, if any.
	StartTimecode string
	// FPS is the timecode frame rate, overriding the file's iXML; nil
	// means the file's, else timecode.Default.
	FPS *timecode.Rate
	// Groups are the programmes carried on parts of the file's channels,
	// each measured on its own in the same pass (see Group); EachChannel
	// makes every channel a mono group. A file without them has no
	// Measurement.Groups.
	Groups      []Group
	EachChannel bool
	// Digest adds the file's size and SHA-256 (Measurement.File), read in
	// a streaming pass after the measurement.
	Digest bool
	// Events set the limits where events begin (see EventLimits).
	Events EventLimits
	// Cores, when set, is the budget of cores this measurement shares with
	// the others of a run: the file holds one while it is measured, and a
	// long file of a splittable format (decode.Splitter) is cut into
	// sections measured at once on as many more as are free (split.go).
	// Nil measures on the calling goroutine alone, in one pass.
	Cores *Cores
	// Decode holds the decoder options (e.g. skipping FLAC's MD5 check),
	// passed to this file's decoder only.
	Decode decode.Options
}

// blockFrames is how many frames are decoded and metered at a time: large
// enough to amortise calls, small enough to stay in cache (64 KiB of float64
// per stereo block).
const blockFrames = 4096

// File measures the file at path. It never returns nil: a file that cannot
// be measured yields a Measurement whose Error names the problem. When ctx
// is cancelled, measuring stops between two blocks and the Measurement's
// Err is ctx's error.
func File(ctx context.Context, path string, opt Options) *Measurement {
	f, err := decode.OpenWith(path, opt.Decode)
	if err != nil {
		return &Measurement{Path: path, Error: errorText(path, err), Err: err, Notes: []string{}}
	}
	defer f.Close()
	m := Stream(ctx, path, f, opt)
	if opt.Digest && m.Error == "" {
		facts, err := Digest(ctx, path)
		if err != nil {
			m.Error, m.Err = errorText(path, err), err
			return m
		}
		m.File = facts
	}
	return m
}

// errorText makes sure an error message names the file once.
func errorText(path string, err error) string {
	if msg := err.Error(); strings.HasPrefix(msg, path) {
		return msg
	}
	return path + ": " + err.Error()
}

// Stream measures an open decoder; path is used for the record and for
// error messages only.
//
// A panic inside a decoder (the FLAC and MP3 decoders wrap third-party
// libraries) is turned into the file's error: one bad file must never stop
// a batch.
// Cancelling ctx stops measuring between two blocks (a few milliseconds of
// work), so a long file is abandoned within a fraction of a second.
func Stream(ctx context.Context, path string, d decode.Decoder, opt Options) (m *Measurement) {
	defer func() {
		if p := recover(); p != nil {
			err := fmt.Errorf("decoder failed on this file: %v", p)
			m = &Measurement{Path: path, Error: errorText(path, err), Err: err, Notes: []string{}}
		}
	}()
	return stream(ctx, path, d, opt)
}

func stream(ctx context.Context, path string, d decode.Decoder, opt Options) *Measurement {
	info := d.Info()
	m := &Measurement{
		Path:          path,
		Format:        info.Container,
		Codec:         info.Codec,
		SampleRateHz:  info.SampleRate,
		Channels:      info.Channels,
		BitsPerSample: BitDepth(info.BitsPerSample),
		SampleFormat:  string(info.SampleFormat),
		Mode:          info.Mode,
		BitRateMode:   info.BitRateMode,
		Tags:          append([]string(nil), info.Tags...),
		Bext:          info.Bext,
		Notes:         []string{},
	}
	if info.BitRate > 0 {
		m.BitRateKbps = math.Round(float64(info.BitRate)/100) / 10
	}
	fail := func(err error) *Measurement {
		m.Error = errorText(path, err)
		m.Err = err
		return m
	}
	if info.Channels <= 0 || info.SampleRate <= 0 {
		return fail(fmt.Errorf("header declares %d channels at %d Hz", info.Channels, info.SampleRate))
	}

	layout, source, note := chooseLayout(info, opt.Layout)
	m.ChannelLayout, m.LayoutSource = layout, source
	if note != "" {
		m.Notes = append(m.Notes, note)
	}
	if source == "default" && info.Channels > 2 {
		m.Notes = append(m.Notes, fmt.Sprintf("the file does not declare its channel layout; assumed %v by channel count (override with --layout)", layout))
	}
	weights, err := loudness.Weights(layout)
	if err != nil {
		return fail(err)
	}
	meter, err := loudness.NewMeter(info.SampleRate, weights)
	if err != nil {
		return fail(err)
	}

	silence := opt.SilenceThresholdDBFS
	if silence == 0 {
		silence = DefaultSilenceThresholdDBFS
	}
	clipRun := opt.ClipRunMinSamples
	if clipRun <= 0 {
		clipRun = DefaultClipRunMinSamples
	}
	start, rate, tcNote, err := startOf(info, opt)
	if err != nil {
		return fail(err)
	}
	if tcNote != "" {
		m.Notes = append(m.Notes, tcNote)
	}
	fold := newDownmixer(layout, info.SampleRate)
	hyg := newHygiene(info.Channels, info.SampleRate, info.BitsPerSample, info.SampleFormat == decode.Float, layout, silence, clipRun)
	ev := newEvents(opt.Events)
	pair := "L/R"
	hyg.onWindow = func(k int64, c float64) { ev.phaseWindow(k, c, &pair) }
	groups, err := groupsFor(opt, info, layout)
	if err != nil {
		return fail(err)
	}
	var progs []*programme
	for _, g := range groups {
		p, err := newProgramme(g, info, silence, clipRun, opt.Events)
		if err != nil {
			return fail(err)
		}
		progs = append(progs, p)
	}

	if c := opt.Cores; c != nil {
		if err := c.take(ctx); err != nil {
			return fail(fmt.Errorf("interrupted before measuring: %w", err))
		}
		defer c.give()
	}
	// Sections are measured without the groups and without clipping and
	// phase events (those need every block in order): a file with groups
	// is read in one pass, and a split file that turns out to clip or to
	// have a window below the phase limit is measured again in one pass,
	// so every event is the one-pass event.
	budget := opt.Cores
	if len(progs) > 0 {
		budget = nil
	}
	redo := func(h *hygiene) bool {
		return h.clipped > 0 || (h.haveWindow && h.minWindow < *ev.lim.PhaseLimit)
	}
	frames, err := measureSplit(ctx, d, info, layout, weights, meter, fold, hyg, budget, redo)
	var damage *decode.IntegrityError
	if frames >= 0 && errors.As(err, &damage) {
		m.Damaged, err = damage.Error(), nil // as onePass records it
	}
	if err != nil {
		return fail(err)
	}
	if frames < 0 {
		sink := blockSink{rate: info.SampleRate, channels: info.Channels, layout: layout, meter: meter, fold: fold, hyg: hyg, ev: ev, progs: progs}
		if frames, err = onePass(ctx, d, info, &sink, m); err != nil {
			return fail(err)
		}
	}

	r := meter.Result()
	m.DurationS = float64(frames) / float64(info.SampleRate)
	if info.Frames >= 0 && frames != info.Frames && m.Damaged == "" {
		m.Notes = append(m.Notes, fmt.Sprintf("header declares %d frames but %d were decoded", info.Frames, frames))
	}
	if n, ok := d.(decode.Noter); ok {
		m.Notes = append(m.Notes, n.Notes()...)
	}
	if u := info.Undeclared; u != nil {
		m.Undeclared = u
		m.Notes = append(m.Notes, UndeclaredText(m.DurationS, u)+"; only the declared audio was measured")
	}
	fillLoudness(m, r)
	if fold != nil {
		m.StereoDownmix = fold.result()
	}
	m.Signal = hyg.finish(info.SampleRate, layout, r.SamplePeak, silence)
	ev.fromSeries(&r.Series, m.DurationS, m.Signal.SilenceThresholdDBFS)
	m.Events, m.EventsOmitted = ev.finish(start)
	m.setTimecode(start, rate)
	for _, p := range progs {
		m.Groups = append(m.Groups, p.finish(m, frames, info.SampleRate, silence, start, rate, opt.KeepSeries))
	}
	if opt.KeepSeries {
		s := r.Series
		m.Series = &s
	}
	return m
}

// chooseLayout picks the user's layout, then the file's, then the default
// by channel count. A user layout applies only to files whose channel
// count it fits: in a mixed batch the others keep their own layout, with a
// note saying so.
func chooseLayout(info decode.Info, user []string) (layout []string, source, note string) {
	if user != nil && len(user) == info.Channels {
		return user, "user", ""
	}
	if user != nil {
		note = fmt.Sprintf("--layout %s names %d channels but the file has %d: it was not applied to this file", strings.Join(user, ","), len(user), info.Channels)
	}
	if len(info.Layout) == info.Channels {
		return info.Layout, "file", note
	}
	return decode.DefaultLayout(info.Channels), "default", note
}

// firstRejected returns the index of the first sample the engine rejects
// (NaN, ±Inf, or beyond ±loudness.MaxMagnitude), or -1.
func firstRejected(v []float64) int {
	for i, x := range v {
		if !(math.Abs(x) <= loudness.MaxMagnitude) { // true for NaN too
			return i
		}
	}
	return -1
}

// unmeasurable is the error for a sample the engine rejects: invalid
// floating-point data (NaN, ±Inf), or a finite value so far beyond full
// scale that its squared sums could overflow (see loudness.MaxMagnitude).
func unmeasurable(frame int64, channel string, rate int, x float64) error {
	at := fmt.Sprintf("sample %d of channel %s (%.3f s)", frame, channel, float64(frame)/float64(rate))
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return fmt.Errorf("%s is %v: the file holds invalid floating-point audio and cannot be measured", at, x)
	}
	return fmt.Errorf("%s is %s: far beyond full scale, cannot be measured (kweigh measures samples up to ±%s)",
		at, sci(x), sci(loudness.MaxMagnitude))
}

// sci writes a huge sample value briefly, e.g. 1e300 or -2.5e155.
func sci(x float64) string {
	return strings.Replace(strconv.FormatFloat(x, 'g', 4, 64), "e+", "e", 1)
}

// fillLoudness copies the engine's result into the record, turning
// undefined readings into nulls with notes.
func fillLoudness(m *Measurement, r loudness.Result) {
	m.IntegratedLUFS = reading(m, "integrated loudness", r.Integrated)
	m.LoudnessRangeLU = reading(m, "loudness range", r.LoudnessRange)
	m.MaxMomentaryLUFS = reading(m, "maximum momentary loudness", r.MaxMomentary)
	m.MaxShortTermLUFS = reading(m, "maximum short-term loudness", r.MaxShortTerm)
	// The BS.1770 Annex 2 interpolator is not a Nyquist filter: its output at
	// the sample instants differs from the samples by up to a few tenths of
	// a dB, so on material without inter-sample overs it can read a little
	// below the sample peak. A signal's true peak cannot be below its sample
	// peak, so each channel reports the larger of the two.
	for i := range r.TruePeak {
		r.TruePeak[i] = math.Max(r.TruePeak[i], r.SamplePeak[i])
	}
	m.TruePeakDBTP = peak(r.MaxTruePeak())
	m.SamplePeakDBFS = peak(r.MaxSamplePeak())
	if m.TruePeakDBTP == nil {
		m.Notes = append(m.Notes, "no true or sample peak: the audio is digital silence")
	}
	m.ChannelTruePeakDBTP = make([]*float64, len(r.TruePeak))
	for i, p := range r.TruePeak {
		m.ChannelTruePeakDBTP[i] = peak(p)
	}
	m.ChannelSamplePeakDBFS = make([]*float64, len(r.SamplePeak))
	for i, p := range r.SamplePeak {
		m.ChannelSamplePeakDBFS[i] = peak(p)
	}
}

func reading(m *Measurement, what string, r loudness.Reading) *float64 {
	if !r.Defined {
		m.Notes = append(m.Notes, fmt.Sprintf("no %s: %s", what, r.Why))
		return nil
	}
	v := r.Value
	return &v
}

func peak(linear float64) *float64 {
	if linear <= 0 {
		return nil
	}
	v := loudness.DB(linear)
	return &v
}

// UndeclaredText says in words what a file holds beyond the declared
// seconds of audio, e.g. "the header declares 10.0 s but 10.0 s more
// audio-like data follows (960000 bytes from byte 960044 that are neither
// chunks nor tags)". Less than 0.05 s is given in bytes.
func UndeclaredText(declaredS float64, u *decode.Undeclared) string {
	if u.Seconds < 0.05 {
		return fmt.Sprintf("the header declares %.1f s but %d more bytes follow the audio from byte %d that are neither chunks nor tags",
			declaredS, u.Bytes, u.Offset)
	}
	return fmt.Sprintf("the header declares %.1f s but %.1f s more audio-like data follows (%d bytes from byte %d that are neither chunks nor tags)",
		declaredS, u.Seconds, u.Bytes, u.Offset)
}

// onePass reads d to its end through the meters and the hygiene probes,
// in order, and returns the frames decoded; damage found on the way goes
// into m.Damaged, and measuring goes on as far as the decoder got.
func onePass(ctx context.Context, d decode.Decoder, info decode.Info, sink *blockSink, m *Measurement) (int64, error) {
	buf := make([]float64, blockFrames*info.Channels)
	var frames int64
	for {
		if err := ctx.Err(); err != nil {
			return frames, fmt.Errorf("interrupted after %.1f s of audio: %w", float64(frames)/float64(info.SampleRate), err)
		}
		n, err := d.ReadFrames(buf)
		if n > 0 {
			if err := sink.write(buf[:n*info.Channels], frames); err != nil {
				return frames, err
			}
			frames += int64(n)
		}
		if err == io.EOF {
			break
		}
		var damage *decode.IntegrityError
		if errors.As(err, &damage) {
			m.Damaged = damage.Error()
			break
		}
		if err != nil {
			return frames, err
		}
		if n == 0 {
			return frames, errors.New("decoder made no progress")
		}
	}
	return frames, nil
}

// blockSink is where every block of decoded audio goes, in order: the
// meter, the hygiene probes and the fold-down meter (nil for files that are
// not surround).
type blockSink struct {
	rate, channels int
	layout         []string
	meter          *loudness.Meter
	fold           *downmixer
	hyg            *hygiene
	// ev and progs, when set (one pass only), take the clipping events of
	// each block and the programme groups' channels.
	ev    *events
	progs []*programme
}

// write measures one block of interleaved frames whose first frame is
// frame at of the file. It returns the error for a sample the engine
// cannot measure, naming where it is.
func (s *blockSink) write(block []float64, at int64) error {
	// The engine counts the samples it cannot measure (NaN, ±Inf, beyond
	// loudness.MaxMagnitude) as it goes; only when it has seen one is the
	// block searched for where.
	before := s.meter.Rejected()
	var clips clipMark // the probes' clipping counts before the block
	if s.ev != nil {
		clips = s.ev.markClips(s.hyg)
	}
	f := -1
	if s.fold == nil {
		s.meter.Write(block)
		if s.meter.Rejected() != before {
			return s.unmeasurable(block, at)
		}
		s.hyg.write(block)
	} else {
		// A surround file's fold-down is made in the probes' pass over
		// the block, then metered beside the block itself
		// (downmixer.writeBeside).
		f = s.fold.writeBeside(s.meter, block, s.hyg)
		if s.meter.Rejected() != before {
			return s.unmeasurable(block, at)
		}
	}
	if s.ev != nil {
		s.ev.afterBlock(s.hyg, clips, at, len(block)/s.channels, s.rate)
	}
	if f >= 0 {
		at += int64(f)
		return fmt.Errorf("frame %d (%.3f s) folds down to a stereo sample beyond ±%s: far beyond full scale, cannot be measured",
			at, float64(at)/float64(s.rate), sci(loudness.MaxMagnitude))
	}
	for _, p := range s.progs {
		if err := p.write(block, s.channels, at); err != nil {
			return err
		}
	}
	return nil
}

// unmeasurable is the error for the first sample of block (frame at of
// the file on) the engine cannot measure.
func (s *blockSink) unmeasurable(block []float64, at int64) error {
	i := firstRejected(block)
	return unmeasurable(at+int64(i/s.channels), s.layout[i%s.channels], s.rate, block[i])
}
