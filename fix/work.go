package fix

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/leftovers"
	"github.com/kweigh/kweigh/loudness/limiter"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// work is one file's correction after planning.
type work struct {
	rec        *Record
	o          Options
	m          *measure.Measurement
	k          kind
	p          *correction
	path, dest string
	lame       string

	info   decode.Info
	layout *pcmLayout // WAV and AIFF
}

func (w *work) run(ctx context.Context) *Record {
	info, err := infoOf(w.path, w.o.Measure.Decode)
	if err != nil {
		return w.rec.fail(err, err.Error())
	}
	w.info = info
	if w.k == kindWAV || w.k == kindAIFF {
		f, size, err := openInput(w.path)
		if err != nil {
			return w.rec.fail(err, err.Error())
		}
		if w.k == kindWAV {
			w.layout, err = scanWAV(f, size, info.BitsPerSample)
		} else {
			w.layout, err = scanAIFF(f, size, info.SampleFormat == decode.Float, info.BitsPerSample)
		}
		f.Close()
		if err != nil {
			return w.rec.fail(err, fmt.Sprintf("%s: %v", w.path, err))
		}
	}
	attempts := 1
	if w.k == kindMP3 && w.lame != "" {
		attempts = 3
	}
	aimOffset := 0.0
	var best *candidate
	if w.k == kindMP3 && w.lame != "" {
		aimOffset = -lameScaleDB(w.info)
	}
	for attempt := 1; ; attempt++ {
		if err := w.settle(ctx, aimOffset); err != nil {
			return w.rec.fail(err, fmt.Sprintf("%s: %v", w.path, err))
		}
		if w.p.limit && w.p.limiting > w.o.MaxLimitingDB+0.05 {
			return w.rec.refuse("%s", tooDynamic(w.p.limiting, w.goal()))
		}
		w.rec.GainDB = ptr(w.p.gain)
		w.rec.LimitingDB = nil
		if w.p.limit {
			w.rec.LimitingDB = ptr(w.p.limiting)
		}
		w.rec.Action = w.p.action()
		w.rec.Passes += w.p.passes
		after, tmp, err := w.write(ctx)
		if err != nil {
			return w.rec.fail(err, fmt.Sprintf("%s: %v", w.path, err))
		}
		if loudnessPasses(after) && (best == nil || w.closer(after, best.after)) {
			if best != nil {
				os.Remove(best.tmp)
			}
			best = &candidate{attempt: attempt, after: after, tmp: tmp, gain: w.rec.GainDB, limiting: w.rec.LimitingDB, action: w.rec.Action}
		} else {
			os.Remove(tmp)
		}
		if best != nil && (attempt >= attempts || w.onAim(best.after)) {
			w.rec.After, w.rec.GainDB, w.rec.LimitingDB, w.rec.Action = best.after, best.gain, best.limiting, best.action
			if err := commit(best.tmp, w.dest); err != nil {
				os.Remove(best.tmp)
				return w.rec.fail(err, fmt.Sprintf("%s: %v", w.path, err))
			}
			w.rec.Output = ptr(w.dest)
			w.sizeRatio()
			if attempt > 1 {
				w.rec.Notes = append(w.rec.Notes, fmt.Sprintf("kept MP3 encode %d, the closest to the aim", best.attempt))
			}
			return w.rec
		}
		if attempt >= attempts {
			w.rec.After = after
			return w.rec.refuse("the corrected audio still fails its loudness or true-peak check (%s); nothing was written", failingLoudness(after))
		}
		// An MP3 re-encode moved the level or the peaks: aim the PCM
		// lower by the measured excess (plus 0.1 dB) and encode again.
		am := after.Measurement
		w.rec.Notes = append(w.rec.Notes, fmt.Sprintf("MP3 encode %d measured %s LUFS, %s dBTP: encoded again", attempt, figure(am.IntegratedLUFS), figure(am.TruePeakDBTP)))
		if am.TruePeakDBTP != nil {
			if over := *am.TruePeakDBTP - (w.p.ceiling - w.o.MarginDB); over > 0 {
				w.p.target -= over + 0.1
				w.rec.Notes = append(w.rec.Notes, fmt.Sprintf("the encoded MP3 peaked %.2f dB over the aim; encoded again with the limiter %.2f dB lower", over, over+0.1))
			}
		}
		if am.IntegratedLUFS != nil && w.p.hasAim {
			aimOffset += w.p.aim - *am.IntegratedLUFS
		}
		if w.p.hasAim && w.m.IntegratedLUFS != nil && w.m.TruePeakDBTP != nil {
			w.p.limit = w.p.limit || *w.m.TruePeakDBTP+w.p.aim+aimOffset-*w.m.IntegratedLUFS > w.p.target
		}
	}
}

// candidate is a written output that passes, kept while an MP3 is encoded
// again in the hope of coming closer to the aim.
type candidate struct {
	attempt  int
	after    *rules.Result
	tmp      string
	gain     *float64
	limiting *float64
	action   Action
}

// closer reports whether a is nearer the aim than b.
func (w *work) closer(a, b *rules.Result) bool {
	miss := func(r *rules.Result) float64 {
		if !w.p.hasAim || r.IntegratedLUFS == nil {
			return 0
		}
		return math.Abs(*r.IntegratedLUFS - w.p.aim)
	}
	return miss(a) < miss(b)
}

// onAim reports whether an output is on the aim within 0.1 LU and under
// the ceiling: an MP3 re-encode that is not is encoded again.
func (w *work) onAim(r *rules.Result) bool {
	m := r.Measurement
	if m.TruePeakDBTP != nil && *m.TruePeakDBTP > w.p.ceiling {
		return false
	}
	return !w.p.hasAim || (m.IntegratedLUFS != nil && math.Abs(*m.IntegratedLUFS-w.p.aim) <= 0.1)
}

func (w *work) goal() string {
	if w.p.hasAim {
		return fmt.Sprintf("%.1f LUFS under %.1f dBTP", w.p.aim, w.p.ceiling)
	}
	return fmt.Sprintf("under %.1f dBTP", w.p.ceiling)
}

// settle finds the gain: with limiting, candidates are measured (the chain
// through measure.Stream, nothing written) and the gain corrected by the
// secant rule until integrated loudness is within OnAimLU of the aim.
// Without limiting a gain shifts loudness exactly, so no pass is needed.
func (w *work) settle(ctx context.Context, aimOffset float64) error {
	p := w.p
	p.passes = 0
	if !p.limit {
		if p.hasAim {
			p.gain = p.aim + aimOffset - *w.m.IntegratedLUFS
		}
		return nil
	}
	aim := p.aim + aimOffset
	g := p.gain
	var prevG, prevI float64
	havePrev := false
	for pass := 1; pass <= MaxPasses; pass++ {
		sim, reduction, err := w.simulate(ctx, g)
		if err != nil {
			return err
		}
		p.passes, p.gain, p.limiting = pass, g, reduction
		if !p.hasAim {
			return nil
		}
		if sim.IntegratedLUFS == nil {
			return errors.New("the corrected audio has no measurable loudness")
		}
		got := *sim.IntegratedLUFS
		miss := aim - got
		if math.Abs(miss) <= OnAimLU {
			return nil
		}
		slope := 1.0
		if havePrev && g != prevG {
			slope = min(max((got-prevI)/(g-prevG), 0.2), 1.5)
		}
		prevG, prevI, havePrev = g, got, true
		g += miss / slope
	}
	w.rec.Notes = append(w.rec.Notes, fmt.Sprintf("integrated loudness not within %.2f LU of the aim after %d passes", OnAimLU, MaxPasses))
	return nil
}

// newLimiter returns the limiter for the current target, or nil.
func (w *work) newLimiter() (*limiter.Limiter, error) {
	if !w.p.limit {
		return nil, nil
	}
	return limiter.New(limiter.Config{
		SampleRate: w.info.SampleRate, Channels: w.info.Channels,
		CeilingDBTP: w.p.target + w.o.MarginDB, MarginDB: w.o.MarginDB,
	})
}

// quantizer returns a fresh quantizer for the output's word length, or nil
// for float outputs.
func (w *work) quantizer() *quantizer {
	switch w.k {
	case kindWAV, kindAIFF:
		if w.layout.float {
			return nil
		}
		return newQuantizer(w.layout.validBits)
	case kindFLAC:
		return newQuantizer(w.info.BitsPerSample)
	}
	return newQuantizer(24) // MP3: a 24-bit intermediate
}

// openChain opens the input and builds the correction chain at gain g.
func (w *work) openChain(g float64) (*decode.File, *chain, *limiter.Limiter, error) {
	f, err := decode.OpenWith(w.path, w.o.Measure.Decode)
	if err != nil {
		return nil, nil, nil, err
	}
	lim, err := w.newLimiter()
	if err != nil {
		f.Close()
		return nil, nil, nil, err
	}
	return f, newChain(f, dbToLinear(g), lim, w.quantizer()), lim, nil
}

// simulate measures the correction at gain g without writing anything and
// returns the measurement and the limiter's deepest reduction.
func (w *work) simulate(ctx context.Context, g float64) (*measure.Measurement, float64, error) {
	f, c, lim, err := w.openChain(g)
	if err != nil {
		return nil, 0, err
	}
	defer f.Close()
	sim := measure.Stream(ctx, w.path, c, w.o.Measure)
	if sim.Error != "" {
		return nil, 0, sim.Err
	}
	red := 0.0
	if lim != nil {
		red = lim.ReductionDB()
	}
	return sim, red, nil
}

// write writes the output to a temporary file beside its destination,
// measures and judges it, and returns the judgement and the temporary
// file's name (the caller commits or removes it).
func (w *work) write(ctx context.Context) (*rules.Result, string, error) {
	dir := filepath.Dir(w.dest)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, "", err
	}
	// Named after this process, so that a later run removes what a killed
	// one left in this folder (package leftovers).
	tmp, err := leftovers.CreateHidden(dir, filepath.Base(w.dest), ".tmp")
	if err != nil {
		return nil, "", err
	}
	name := tmp.Name()
	ok := false
	defer func() {
		tmp.Close()
		if !ok {
			os.Remove(name)
		}
	}()
	if st, err := os.Stat(w.path); err == nil {
		tmp.Chmod(st.Mode().Perm())
	}
	f, c, _, err := w.openChain(w.p.gain)
	if err != nil {
		return nil, "", err
	}
	defer f.Close()
	var flacSum [16]byte
	switch {
	case w.k == kindWAV || w.k == kindAIFF:
		in, size, err := openInput(w.path)
		if err != nil {
			return nil, "", err
		}
		_, err = writePCM(tmp, in, size, w.layout, c)
		in.Close()
		if err != nil {
			return nil, "", err
		}
	case w.k == kindFLAC:
		blocks, dropped, err := flacMetadata(w.path)
		if err != nil {
			return nil, "", err
		}
		if len(dropped) > 0 {
			w.rec.Notes = append(w.rec.Notes, "metadata dropped from the FLAC output (no longer true after re-encoding): "+strings.Join(dropped, ", "))
		}
		if flacSum, err = writeFLAC(tmp, c, blocks); err != nil {
			return nil, "", err
		}
	case w.k == kindMP3 && w.lame != "":
		wavName := name + ".wav"
		wf, err := os.Create(wavName)
		if err != nil {
			return nil, "", err
		}
		defer os.Remove(wavName)
		_, err = writeWAV24(wf, c)
		if cerr := wf.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			return nil, "", err
		}
		if err := runLame(ctx, w.lame, w.info, wavName, name); err != nil {
			return nil, "", err
		}
	default: // MP3 without an encoder
		if _, err := writeWAV24(tmp, c); err != nil {
			return nil, "", err
		}
		if !hasNote(w.rec.Notes, "lame") {
			w.rec.Notes = append(w.rec.Notes, "lame is not on PATH: this is a 24-bit WAV of the corrected audio; encode the MP3 from it, then check the MP3 (encoding changes level and peaks)")
		}
	}
	if err := tmp.Sync(); err != nil {
		return nil, "", err
	}
	if w.k == kindFLAC {
		if err := verifyFLAC(name, flacSum); err != nil {
			return nil, "", err
		}
	}
	opt := engine.MeasureOptionsFor(w.o.Measure, w.o.Spec)
	opt.Decode.SkipMD5 = false // the output is proved in full
	am := measure.File(ctx, name, opt)
	if am.Error != "" {
		return nil, "", fmt.Errorf("measuring the output: %s", am.Error)
	}
	if am.Damaged != "" {
		return nil, "", fmt.Errorf("the output does not decode cleanly: %s", am.Damaged)
	}
	if w.k == kindWAV && w.layout.bextBody >= 0 {
		if err := patchBext(tmp, w.layout.bextBody, w.layout.bextSize, am); err != nil {
			w.rec.Notes = append(w.rec.Notes, err.Error())
		} else {
			if err := tmp.Sync(); err != nil {
				return nil, "", err
			}
			if am = measure.File(ctx, name, opt); am.Error != "" {
				return nil, "", fmt.Errorf("measuring the output: %s", am.Error)
			}
		}
	}
	am.Path = w.dest
	after := engine.Evaluate(w.o.Spec, am) // the judgement engine.Judge makes (groups, event limits), of the patched output
	ok = true
	return &after, name, nil
}

// verifyFLAC checks that the output's STREAMINFO carries the MD5 of the
// samples given to the encoder; measuring the output then decodes every
// frame (CRCs checked) and compares the decoded audio with that MD5.
func verifyFLAC(name string, want [16]byte) error {
	got, err := flacStreamMD5(name)
	if err != nil {
		return err
	}
	if got != want {
		return fmt.Errorf("the FLAC output's MD5 %x is not that of the audio encoded (%x)", got, want)
	}
	return nil
}

func figure(p *float64) string {
	if p == nil {
		return "n/a"
	}
	return fmt.Sprintf("%.2f", *p)
}

func hasNote(notes []string, word string) bool {
	for _, n := range notes {
		if strings.Contains(n, word) {
			return true
		}
	}
	return false
}

// loudnessPasses reports whether the integrated and true-peak checks of r
// pass or warn.
func loudnessPasses(r *rules.Result) bool {
	for _, c := range r.Checks {
		if (c.ID == "integrated" || c.ID == "true_peak") && (c.Verdict == rules.Fail || c.Verdict == rules.Error) {
			return false
		}
	}
	return r.Verdict != rules.Error
}

func failingLoudness(r *rules.Result) string {
	var s []string
	for _, c := range judged(r) {
		if (c.ID == "integrated" || c.ID == "true_peak") && c.Verdict == rules.Fail {
			s = append(s, c.Reason)
		}
	}
	return strings.Join(s, "; ")
}

// sizeRatio records output size over input size for re-encoded formats.
func (w *work) sizeRatio() {
	if w.k != kindFLAC && w.k != kindMP3 {
		return
	}
	a, errA := os.Stat(w.path)
	b, errB := os.Stat(w.dest)
	if errA == nil && errB == nil && a.Size() > 0 {
		w.rec.SizeRatio = ptr(math.Round(float64(b.Size())/float64(a.Size())*1000) / 1000)
	}
}

// commit moves the finished temporary file onto its destination: the data
// was synced before it was measured; the rename is atomic on one file
// system, and the folder is synced so that the new name is durable. Until
// the rename the destination (the input itself, in place) is untouched.
func commit(tmp, dest string) error {
	if err := os.Rename(tmp, dest); err != nil {
		return err
	}
	d, err := os.Open(filepath.Dir(dest))
	if err != nil {
		return err
	}
	defer d.Close()
	return d.Sync()
}
