package watch

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"time"
)

// process takes one file through its remaining steps. Each step's outcome
// is committed to the ledger before the next step acts.
func (w *watcher) process(ctx context.Context, e Entry) result {
	bg := context.WithoutCancel(ctx)
	if e.State != StateJudged {
		r, ok := w.judge(ctx, bg, &e)
		if !ok {
			return r
		}
	}
	return w.place(bg, e)
}

// sameVersion reports whether the file at e's path is still e's version.
func sameVersion(st fs.FileInfo, e Entry) bool {
	return st.Size() == e.Size && st.ModTime().Equal(e.ModTime)
}

// judge runs the steps up to judged. ok is false when the file is finished
// with (skipped, gone) or must wait (changed, failed, abandoned).
func (w *watcher) judge(ctx, bg context.Context, e *Entry) (result, bool) {
	p := e.Path()
	changed := func(st fs.FileInfo) result {
		w.log.Info("changed: settling again", "file", p)
		e.Size, e.ModTime, e.State = st.Size(), st.ModTime(), StateSeen
		if err := w.led.Observed(bg, e.ID, e.Size, e.ModTime, StateSeen, time.Now()); err != nil {
			w.log.Error("ledger", "file", p, "err", err)
		}
		return result{entry: *e, outcome: outcomeChanged}
	}
	st, err := os.Stat(p)
	if err != nil {
		return w.vanished(bg, *e, err, "vanished before it was judged"), false
	}
	if !sameVersion(st, *e) {
		return changed(st), false
	}
	// The fingerprint names the content that is judged. A file that cannot
	// be read has none; the judge says why it cannot be read.
	fp, err := fingerprint(p)
	if err != nil {
		w.log.Warn("cannot read file", "file", p, "err", err)
	}
	// Report names (and the placement name) are chosen now, free in the
	// ledger and in both destination folders, and kept if the file is
	// judged again after an interruption.
	stem, err := w.led.Judging(bg, e.ID, fp, func(n int) string { return numbered(e.Rel, n) }, func(n int) bool {
		for _, dir := range []string{w.o.Passed, w.o.Failed} {
			if dir == "" {
				continue
			}
			if _, err := os.Lstat(filepath.Join(dir, filepath.FromSlash(numbered(e.Rel, n)))); err == nil {
				return false
			}
		}
		return true
	}, time.Now())
	if err != nil {
		w.log.Error("ledger", "file", p, "err", err)
		return result{entry: *e, outcome: outcomeRetry}, false
	}
	e.State, e.Fingerprint, e.Stem = StateJudging, fp, stem
	testPause("judging", p)
	j, err := w.o.Judge(ctx, p, e.Inbox)
	if err != nil {
		if ctx.Err() != nil {
			w.log.Info("judgement abandoned; judged again on the next start", "file", p)
			return result{entry: *e, outcome: outcomeAbandoned}, false
		}
		w.log.Error("judging failed", "file", p, "err", err)
		w.led.Problem(bg, e.ID, err.Error(), time.Now())
		return result{entry: *e, outcome: outcomeRetry}, false
	}
	// The verdict must be the whole file's: a file that changed while it
	// was judged settles and is judged again.
	if st, err := os.Stat(p); err != nil {
		return w.vanished(bg, *e, err, "vanished while it was judged"), false
	} else if !sameVersion(st, *e) {
		return changed(st), false
	}
	if j.Skipped {
		w.log.Info("not audio: left alone", "file", p, "note", j.Problem)
		if err := w.led.Skipped(bg, e.ID, j.Problem, time.Now()); err != nil {
			w.log.Error("ledger", "file", p, "err", err)
			return result{entry: *e, outcome: outcomeRetry}, false
		}
		return result{entry: *e, outcome: outcomeDone, skipped: true}, false
	}
	if err := w.writeReports(stem, j); err != nil {
		w.log.Error("cannot write the report pair", "file", p, "err", err)
		w.led.Problem(bg, e.ID, err.Error(), time.Now())
		return result{entry: *e, outcome: outcomeRetry}, false
	}
	dest := w.destination(j.Verdict, stem)
	if err := w.led.Judged(bg, e.ID, j.Verdict, j.Record, w.o.Reports, dest, j.Problem, time.Now()); err != nil {
		w.log.Error("ledger", "file", p, "err", err)
		return result{entry: *e, outcome: outcomeRetry}, false
	}
	e.State, e.Verdict, e.Record, e.Reports, e.Dest, e.Error = StateJudged, j.Verdict, j.Record, w.o.Reports, dest, j.Problem
	testPause("judged", p)
	return result{}, true
}

// vanished records a file that is no longer there (or cannot be looked at).
func (w *watcher) vanished(bg context.Context, e Entry, err error, reason string) result {
	p := e.Path()
	if !errors.Is(err, fs.ErrNotExist) {
		w.log.Error("cannot look at file", "file", p, "err", err)
		w.led.Problem(bg, e.ID, err.Error(), time.Now())
		return result{entry: e, outcome: outcomeRetry}
	}
	w.log.Warn(reason, "file", p)
	if err := w.led.Gone(bg, e.ID, reason, time.Now()); err != nil {
		w.log.Error("ledger", "file", p, "err", err)
	}
	return result{entry: e, outcome: outcomeDone, gone: true}
}

// reportPaths are the report pair's paths for a stem.
func (w *watcher) reportPaths(stem string) (jsonPath, htmlPath string) {
	base := filepath.Join(w.o.Reports, filepath.FromSlash(stem))
	return base + ".json", base + ".html"
}

// writeReports writes the report pair, each file atomically; writing them
// again (after a crash) gives the same pair.
func (w *watcher) writeReports(stem string, j Judgement) error {
	jp, hp := w.reportPaths(stem)
	if err := writeAtomic(jp, append(indentJSON(j.Record), '\n')); err != nil {
		return err
	}
	return writeAtomic(hp, j.Page)
}

// destination is where a file with this verdict goes: Passed for pass and
// warn (Judge has already made warnings fail under --strict), Failed for
// fail and error; empty when that folder is not set.
func (w *watcher) destination(verdict, stem string) string {
	dir := w.o.Failed
	if verdict == "pass" || verdict == "warn" {
		dir = w.o.Passed
	}
	if dir == "" {
		return ""
	}
	return filepath.Join(dir, filepath.FromSlash(stem))
}

// place moves a judged file to its destination and records it placed,
// with its notification queued in the same commit.
func (w *watcher) place(bg context.Context, e Entry) result {
	p := e.Path()
	dest := e.Dest
	if dest != "" {
		var err error
		if dest, err = w.move(bg, e); err != nil {
			if errors.Is(err, errVanished) {
				return w.vanished(bg, e, fs.ErrNotExist, err.Error())
			}
			w.log.Error("cannot place file", "file", p, "to", e.Dest, "err", err)
			w.led.Problem(bg, e.ID, err.Error(), time.Now())
			return result{entry: e, outcome: outcomeRetry}
		}
	}
	testPause("moved", p)
	now := time.Now().UTC()
	line := placedRecord(e.Record, now, dest)
	if err := w.led.Placed(bg, e.ID, dest, now, w.o.Notify, line); err != nil {
		w.log.Error("ledger", "file", p, "err", err)
		return result{entry: e, outcome: outcomeRetry}
	}
	e.State, e.Dest, e.PlacedAt = StatePlaced, dest, now
	w.emit(e, line)
	if w.o.Notify != "" {
		select {
		case w.poke <- struct{}{}:
		default:
		}
	}
	w.log.Info("placed", "file", p, "verdict", e.Verdict, "to", dest)
	return result{entry: e, outcome: outcomeDone, counted: true, verdict: e.Verdict}
}

// errVanished is a judged file gone from the inbox without reaching its
// destination.
var errVanished = errors.New("vanished before it was placed")

// move brings the judged file to e.Dest (or, on a clash with a file that is
// not ours, to the next free numbered name, recorded before moving) and
// returns where it went. A destination that exists with the file's size is
// a move already done.
func (w *watcher) move(bg context.Context, e Entry) (string, error) {
	p, dest := e.Path(), e.Dest
	st, err := os.Stat(p)
	switch {
	case errors.Is(err, fs.ErrNotExist) || (err == nil && !sameVersion(st, e)):
		if dst, derr := os.Stat(dest); derr == nil && dst.Size() == e.Size {
			return dest, nil // moved before an interruption
		}
		if err == nil {
			return "", fmt.Errorf("replaced before it was placed: %w", errVanished)
		}
		return "", errVanished
	case err != nil:
		return "", err
	}
	for attempt := 0; ; attempt++ {
		testPause("moving", p)
		err := moveFile(p, dest, e.Size)
		if !errors.Is(err, errClash) || attempt > 100 {
			return dest, err
		}
		// Someone else's file took the name: the next free number.
		dir, base := filepath.Split(e.Dest)
		for n := 2; ; n++ {
			cand := filepath.Join(dir, numbered(base, n))
			if _, err := os.Lstat(cand); errors.Is(err, fs.ErrNotExist) {
				dest = cand
				break
			}
		}
		if err := w.led.Redirect(bg, e.ID, dest, time.Now()); err != nil {
			return "", err
		}
	}
}
