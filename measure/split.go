package measure

import (
	"context"
	"fmt"
	"io"
	"sync"
	"sync/atomic"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/loudness"
)

// One file on several cores.
//
// A long file whose decoder can start at any frame (decode.Splitter) is cut
// into sections at multiples of 3 s: a whole number of 100 ms blocks (the
// engine's unit, see loudness/segment.go) and of correlation windows (the
// hygiene probes' unit), so every block and every window falls inside one
// section. Each section is measured on its own core by its own meters and
// probes, warmed with loudness.PreRollSeconds of the audio before it, and
// the sections are joined in order: the figures are those of one pass
// (peaks, counts, extremes and silence exactly; loudness within 1e-9 LU and
// the whole-file sums within their last bits, as split_test.go checks).
// Sections are measured in rounds of one per core, so memory stays bounded
// whatever the length. A section that meets damage (the file shrank) makes
// the whole file fall back to one pass, which reports it in order.

// Cores is a budget of cores shared by the files of a run and the sections
// of each file: with engine.Run on N workers, NewCores(N) keeps the run at
// N busy goroutines whether it measures N files at once or one file on N
// cores. It is safe for concurrent use.
type Cores struct {
	free chan struct{}
}

// NewCores returns a budget of n cores (at least 1).
func NewCores(n int) *Cores {
	c := &Cores{free: make(chan struct{}, max(n, 1))}
	for range cap(c.free) {
		c.free <- struct{}{}
	}
	return c
}

// take waits for a free core.
func (c *Cores) take(ctx context.Context) error {
	select {
	case <-c.free:
		return nil
	case <-ctx.Done():
		return context.Cause(ctx)
	}
}

// tryTake takes a free core if there is one.
func (c *Cores) tryTake() bool {
	select {
	case <-c.free:
		return true
	default:
		return false
	}
}

// give returns a core.
func (c *Cores) give() { c.free <- struct{}{} }

// Section lengths, in seconds: a file shorter than two of the shortest is
// measured in one pass; the longest bounds the memory of a section's block
// log (3 000 blocks).
const (
	minSectionS = 30
	maxSectionS = 300
	// sectionUnitS is the grid sections are cut on: the 3 s correlation
	// window, itself 30 blocks of 100 ms.
	sectionUnitS = correlationWindowS
)

// section is one stretch of a file and what its measurement found.
type section struct {
	from, to int64 // frames [from, to) of the file
	meter    *loudness.Meter
	fold     *downmixer
	hyg      *hygiene
	lead     []int64 // full-scale samples each channel starts with
	err      error   // an unmeasurable sample or a cancelled context
	onePass  bool    // damage or a read error: measure the file in one pass
}

// measureSplit measures d in sections on the cores of budget that are free
// (besides the one the caller holds) and joins them into meter, fold and
// hyg. It returns the frames measured, or -1 when the file is to be read
// in one pass instead: no budget, no free core, a file too short or not
// splittable, or damage met in a section. d itself is not read.
//
// redo is asked of the joined probes at the end: when it says so, the
// split result is dropped and -1 returned, as for damage (the file's
// events need a pass in order).
func measureSplit(ctx context.Context, d decode.Decoder, info decode.Info, layout []string, weights []float64,
	meter *loudness.Meter, fold *downmixer, hyg *hygiene, budget *Cores, redo func(*hygiene) bool) (int64, error) {
	sp, ok := decode.Splittable(d)
	if budget == nil || !ok {
		return -1, nil
	}
	total, rate := sp.SplitFrames(), int64(info.SampleRate)
	if total < 2*minSectionS*rate {
		return -1, nil
	}
	unit := sectionUnitS * rate
	helpers := 0
	for helpers+1 < cap(budget.free) && budget.tryTake() {
		helpers++
	}
	defer func() {
		for range helpers {
			budget.give()
		}
	}()
	if helpers == 0 {
		return -1, nil
	}
	cores := int64(helpers + 1)
	// One section per core per round, each a whole number of units.
	length := (total + cores - 1) / cores
	length = min(max(length, minSectionS*rate), maxSectionS*rate)
	length = (length + unit - 1) / unit * unit
	// A stream checksummed as a whole (FLAC's MD5) wants sections short
	// enough that the audio waiting for the check stays small.
	checker, _ := sp.(decode.SectionChecker)
	if checker != nil {
		if most := checker.MaxSectionFrames(); most > 0 {
			length = min(length, max(most/unit*unit, unit))
		}
	}

	blank := *hyg // the probes' configuration, before anything is joined
	restart := func() {
		// Start again from nothing: one pass reads the file from its first
		// frame.
		meter.Reset()
		if fold != nil {
			fold.meter.Reset()
		}
		*hyg = blank
		hyg.sum, hyg.run = make([]float64, len(blank.sum)), make([]int64, len(blank.run))
	}
	var frames int64
	for from := int64(0); from < total; {
		round := make([]*section, 0, cores)
		for ; from < total && int64(len(round)) < cores; from += length {
			round = append(round, &section{from: from, to: min(from+length, total)})
		}
		var wg sync.WaitGroup
		for _, s := range round {
			wg.Add(1)
			go func() {
				defer wg.Done()
				measureSection(ctx, sp, s, info, layout, weights, &blank)
			}()
		}
		wg.Wait()
		for _, s := range round {
			if s.onePass {
				restart()
				return -1, nil
			}
			if s.err != nil {
				return frames, s.err
			}
			if err := meter.Join(s.meter); err != nil {
				return frames, err
			}
			if fold != nil {
				if err := fold.meter.Join(s.fold.meter); err != nil {
					return frames, err
				}
			}
			hyg.join(s.hyg, s.lead)
			frames = s.to
		}
	}
	if redo != nil && redo(hyg) {
		restart()
		return -1, nil
	}
	if checker != nil {
		// An *decode.IntegrityError here is the damage one pass reports at
		// its end; the caller records it the same way.
		if err := checker.CheckSections(); err != nil {
			return frames, err
		}
	}
	return frames, nil
}

// sectionsMeasured counts the sections measured since start-up, for tests
// that must know the split path ran.
var sectionsMeasured atomic.Int64

// measureSection measures s with meters and probes of its own, configured
// like the whole file's (template is an empty hygiene of the file's
// configuration; it is copied, not changed).
func measureSection(ctx context.Context, sp decode.Splitter, s *section, info decode.Info, layout []string, weights []float64, template *hygiene) {
	sectionsMeasured.Add(1)
	rate, nch := int64(info.SampleRate), info.Channels
	block := s.from / rate * 10 // s.from is a whole number of seconds
	pre := max(0, s.from-loudness.PreRollSeconds*rate)
	dec, err := sp.Section(pre, s.to)
	if err != nil {
		s.onePass = true
		return
	}
	if s.meter, err = loudness.NewMeter(info.SampleRate, weights); err == nil {
		err = s.meter.StartAt(block)
	}
	if err != nil {
		s.err = err
		return
	}
	if s.fold = newDownmixer(layout, info.SampleRate); s.fold != nil {
		if err := s.fold.meter.StartAt(block); err != nil {
			s.err = err
			return
		}
	}
	h := *template
	h.sum, h.run = make([]float64, nch), make([]int64, nch)
	h.onWindow = nil // the file's phase events come from a pass in order (see redo in stream)
	s.hyg = &h
	s.lead = make([]int64, nch)
	open := make([]bool, nch)
	for c := range open {
		open[c] = true
	}
	sink := blockSink{rate: info.SampleRate, channels: nch, layout: layout, meter: s.meter, fold: s.fold, hyg: s.hyg}

	buf := make([]float64, blockFrames*nch)
	at := pre
	for at < s.to {
		if err := ctx.Err(); err != nil {
			s.err = fmt.Errorf("interrupted after %.1f s of audio: %w", float64(s.from)/float64(rate), err)
			return
		}
		n, err := dec.ReadFrames(buf)
		if n == 0 || err != nil && err != io.EOF {
			// The section ends early (the file shrank) or cannot be read:
			// one pass reports it in order.
			s.onePass = true
			return
		}
		b := buf[:n*nch]
		if at < s.from {
			k := min(int64(n), s.from-at)
			s.meter.Warm(b[:k*int64(nch)])
			if s.fold != nil {
				s.fold.warm(b[:k*int64(nch)])
			}
			at += k
			b = b[k*int64(nch):]
		}
		if len(b) == 0 {
			continue
		}
		s.hyg.leadingClip(b, s.lead, open)
		if err := sink.write(b, at); err != nil {
			s.err = err
			return
		}
		at += int64(len(b) / nch)
	}
}

// warm folds frames down and warms the fold-down meter with them (see
// loudness.Meter.Warm).
func (d *downmixer) warm(buf []float64) {
	frames := len(buf) / d.channels
	out := make([]float64, 2*frames)
	d.fold(out, buf)
	d.meter.Warm(out)
}
