package watch

import (
	"context"
	"errors"
	"io/fs"
	"log/slog"
	"os"
	"path/filepath"
	"sync"
	"time"
)

// Summary counts what one run did with the files it finished.
type Summary struct {
	Files   int // judged and placed in this run (skipped ones not counted)
	Passed  int
	Warned  int
	Failed  int
	Errors  int // files that could not be judged, and steps that failed
	Skipped int // not audio: left alone
	Gone    int // vanished or replaced before they were placed
}

func (s *Summary) add(verdict string) {
	s.Files++
	switch verdict {
	case "pass":
		s.Passed++
	case "warn":
		s.Warned++
	case "fail":
		s.Failed++
	default:
		s.Errors++
	}
}

// candidate is a file not yet judged: seen, waiting to settle.
type candidate struct {
	id         int64
	inbox, rel string
	size       int64
	mtime      time.Time
	since      time.Time // last change observed (or first sight)
	state      State
	complained bool // an error about this file was logged already
}

// version identifies a finished file version without asking the ledger.
type version struct {
	size  int64
	mtime time.Time
}

// outcome is what a worker reports back to the loop.
type outcome int

const (
	outcomeDone      outcome = iota // placed, skipped or gone
	outcomeChanged                  // changed before or while judging: settle again
	outcomeRetry                    // a step failed; try again at the next rescan
	outcomeAbandoned                // stopped by cancellation; redone on restart
)

type result struct {
	entry   Entry
	outcome outcome
	counted bool // a verdict for the summary
	skipped bool
	gone    bool
	verdict string
}

type watcher struct {
	o        Options
	led      *Ledger
	log      *slog.Logger
	names    Names
	inboxes  []string
	skip     []string // absolute folders never scanned (state, reports, passed, failed)
	cands    map[string]*candidate
	busy     map[string]bool
	finished map[string]version
	retry    map[string]Entry // failed a step; queued again at the next rescan
	queue    []Entry
	work     chan Entry
	results  chan result
	poke     chan struct{} // wakes the notifier
	events   *events
	complain map[string]bool     // paths whose non-regular type was logged
	dirty    map[*candidate]bool // changes not yet committed
	present  map[string]bool     // paths found by the full scan in progress
	summary  Summary
	outMu    sync.Mutex
}

// Run watches the inboxes until ctx is cancelled (or, with Once, until the
// files present at the start are placed) and returns what it did. Work in
// progress at cancellation is finished (moves) or abandoned (judgements,
// redone on the next start). The error is for the watcher itself (no
// ledger, bad options); problems with files are logged, recorded in the
// ledger and counted in the Summary.
func Run(ctx context.Context, o Options) (Summary, error) {
	o, err := o.withDefaults()
	if err != nil {
		return Summary{}, err
	}
	names, err := NewNames(o.Ignore)
	if err != nil {
		return Summary{}, err
	}
	led, err := OpenLedger(o.State)
	if err != nil {
		return Summary{}, err
	}
	defer led.Close()
	w := &watcher{
		o: o, led: led, log: o.Log, names: names,
		cands: map[string]*candidate{}, busy: map[string]bool{}, finished: map[string]version{},
		work: make(chan Entry), results: make(chan result), poke: make(chan struct{}, 1),
		complain: map[string]bool{}, dirty: map[*candidate]bool{}, retry: map[string]Entry{},
	}
	for _, in := range o.Inboxes {
		w.inboxes = append(w.inboxes, filepath.Clean(in))
	}
	for _, d := range []string{o.State, o.Reports, o.Passed, o.Failed} {
		if d != "" {
			w.skip = append(w.skip, absPath(d))
		}
	}
	return w.run(ctx)
}

func (w *watcher) run(ctx context.Context) (Summary, error) {
	bg := context.WithoutCancel(ctx)
	var workers sync.WaitGroup
	for i := 0; i < w.o.Jobs; i++ {
		workers.Add(1)
		go func() {
			defer workers.Done()
			for e := range w.work {
				w.results <- w.process(ctx, e)
			}
		}()
	}
	notifyCtx, stopNotify := context.WithCancel(ctx)
	var notifier sync.WaitGroup
	if w.o.Notify != "" && !w.o.Once {
		notifier.Add(1)
		go func() { defer notifier.Done(); w.notifier(notifyCtx) }()
	}
	if !w.o.Once && w.o.Poll <= 0 {
		ev, err := newEvents()
		if err != nil {
			w.log.Warn("file-system events unavailable; relying on rescans", "err", err)
		} else {
			w.events = ev
			defer ev.close()
		}
	}
	if err := w.recover(bg); err != nil {
		close(w.work)
		workers.Wait()
		stopNotify()
		return w.summary, err
	}
	w.scanAll(bg)
	mode := "events and rescans"
	switch {
	case w.o.Once:
		mode = "once"
	case w.events == nil:
		mode = "polling"
	}
	w.log.Info("watching", "inboxes", w.inboxes, "mode", mode, "settle", w.o.Settle, "state", w.o.State)

	period := w.o.Rescan
	if w.o.Poll > 0 {
		period = w.o.Poll
	}
	rescan := time.NewTicker(period)
	defer rescan.Stop()
	settle := time.NewTicker(settleStep(w.o.Settle))
	defer settle.Stop()
	var hints <-chan hint
	if w.events != nil {
		hints = w.events.hints
	}
loop:
	for {
		if w.o.Once && len(w.cands) == 0 && len(w.busy) == 0 && len(w.queue) == 0 {
			break
		}
		var send chan Entry
		var next Entry
		if len(w.queue) > 0 {
			send, next = w.work, w.queue[0]
		}
		select {
		case <-ctx.Done():
			break loop
		case send <- next:
			w.queue = w.queue[1:]
		case r := <-w.results:
			w.finish(bg, r)
		case h := <-hints:
			w.hint(bg, h)
		case <-rescan.C:
			if !w.o.Once { // once: only what was there at the start
				w.scanAll(bg)
				w.retryFailed()
			}
		case <-settle.C:
			w.settleTick(bg)
		}
	}
	close(w.work)
	// Drain the workers: moves finish, judgements stop at cancellation.
	go func() { workers.Wait(); close(w.results) }()
	for r := range w.results {
		w.finish(bg, r)
	}
	stopNotify()
	notifier.Wait()
	if w.o.Once && w.o.Notify != "" {
		w.deliverAll(ctx)
	}
	if ctx.Err() != nil {
		w.log.Info("stopped", "unfinished", len(w.cands)+len(w.queue))
	}
	return w.summary, nil
}

// settleStep is how often candidates are looked at again: a quarter of the
// settle time, so a file is taken at most 25 % late.
func settleStep(settle time.Duration) time.Duration {
	return min(max(settle/4, 10*time.Millisecond), time.Second)
}

// recover picks up what a previous run left: judged files are placed,
// everything before judged waits to settle again (a file caught
// mid-judgement is judged again, from the start).
func (w *watcher) recover(ctx context.Context) error {
	rows, err := w.led.Unfinished(ctx)
	if err != nil {
		return err
	}
	now := time.Now()
	for _, e := range rows {
		if !w.isInbox(e.Inbox) {
			continue // another run's inbox: left for it
		}
		path := e.Path()
		if e.State == StateJudged {
			w.log.Info("resuming placement", "file", path)
			w.busy[path] = true
			w.queue = append(w.queue, e)
			continue
		}
		if e.State == StateJudging {
			w.log.Info("judging again after an interruption", "file", path)
		}
		w.cands[path] = &candidate{id: e.ID, inbox: e.Inbox, rel: e.Rel, size: e.Size, mtime: e.ModTime, since: now, state: e.State}
	}
	return nil
}

func (w *watcher) isInbox(in string) bool {
	for _, x := range w.inboxes {
		if x == in {
			return true
		}
	}
	return false
}

// observe handles one file found by a scan or an event. What it finds is
// written to the ledger by the next commit, one transaction per scan.
func (w *watcher) observe(ctx context.Context, inbox, rel string, st fs.FileInfo, now time.Time) {
	path := filepath.Join(inbox, filepath.FromSlash(rel))
	if _, waiting := w.retry[path]; w.busy[path] || waiting {
		return
	}
	if c := w.cands[path]; c != nil {
		w.update(c, st, now)
		return
	}
	if v, ok := w.finished[path]; ok && v.size == st.Size() && v.mtime.Equal(st.ModTime()) {
		return
	}
	e, ok, err := w.led.Version(ctx, inbox, rel, st.Size(), st.ModTime())
	if err != nil {
		w.log.Error("ledger", "file", path, "err", err)
		return
	}
	if ok && (e.State == StatePlaced || e.State == StateJudged) {
		// Placed, or judged and queued for placing since the start.
		w.finished[path] = version{st.Size(), st.ModTime()}
		return
	}
	c := &candidate{inbox: inbox, rel: rel, size: st.Size(), mtime: st.ModTime(), since: now, state: StateSeen}
	if ok && e.State != StateGone {
		c.id = e.ID // this version's row, not yet judged: no second row
	} else {
		w.log.Info("seen", "file", path, "size", st.Size())
	}
	w.cands[path] = c
	w.dirty[c] = true
}

// update compares a candidate with its file as it is now.
func (w *watcher) update(c *candidate, st fs.FileInfo, now time.Time) {
	if st.Size() != c.size || !st.ModTime().Equal(c.mtime) {
		c.size, c.mtime, c.since, c.state = st.Size(), st.ModTime(), now, StateSeen
		w.dirty[c] = true
		return
	}
	if c.state == StateSeen {
		c.state = StateSettling
		w.dirty[c] = true
	}
}

// commit writes what the last scan or tick found to the ledger, in one
// transaction, before any of it is acted on. Files new to the ledger get
// their rows (and ids) here; if the commit fails they are forgotten and
// found again by the next scan.
func (w *watcher) commit(ctx context.Context) {
	if len(w.dirty) == 0 {
		return
	}
	obs := make([]*Observation, 0, len(w.dirty))
	cands := make([]*candidate, 0, len(w.dirty))
	for c := range w.dirty {
		obs = append(obs, &Observation{ID: c.id, Inbox: c.inbox, Rel: c.rel, Size: c.size, ModTime: c.mtime, State: c.state})
		cands = append(cands, c)
	}
	clear(w.dirty)
	if err := w.led.Observe(ctx, obs, time.Now()); err != nil {
		w.log.Error("ledger", "err", err)
		for _, c := range cands {
			if c.id == 0 {
				delete(w.cands, filepath.Join(c.inbox, filepath.FromSlash(c.rel)))
			}
		}
		return
	}
	for i, c := range cands {
		c.id = obs[i].ID
	}
}

// settleTick looks at every candidate again and hands the settled ones to
// the workers.
func (w *watcher) settleTick(ctx context.Context) {
	now := time.Now()
	for path, c := range w.cands {
		st, err := os.Stat(path)
		switch {
		case errors.Is(err, fs.ErrNotExist):
			w.log.Warn("vanished before it was judged", "file", path)
			if err := w.led.Gone(ctx, c.id, "vanished before it was judged", now); err != nil {
				w.log.Error("ledger", "file", path, "err", err)
			}
			delete(w.cands, path)
			w.summary.Gone++
			continue
		case err != nil:
			if !c.complained {
				w.log.Error("cannot look at file", "file", path, "err", err)
				w.led.Problem(ctx, c.id, err.Error(), now)
				c.complained = true
			}
			if w.o.Once { // no later look in this run: an error, left for the next
				delete(w.cands, path)
				w.summary.Errors++
			}
			continue
		case !st.Mode().IsRegular():
			w.log.Warn("no longer a regular file", "file", path)
			w.led.Gone(ctx, c.id, "no longer a regular file", now)
			delete(w.cands, path)
			w.summary.Gone++
			continue
		}
		w.update(c, st, now)
		if now.Sub(c.since) < w.o.Settle || c.id == 0 {
			continue
		}
		w.log.Info("taken", "file", path, "size", c.size)
		delete(w.cands, path)
		w.busy[path] = true
		w.queue = append(w.queue, Entry{ID: c.id, Inbox: c.inbox, Rel: c.rel, Size: c.size, ModTime: c.mtime, State: StateSettling})
	}
	w.commit(ctx)
}

// finish takes a worker's result.
func (w *watcher) finish(ctx context.Context, r result) {
	path := r.entry.Path()
	delete(w.busy, path)
	switch r.outcome {
	case outcomeDone:
		w.finished[path] = version{r.entry.Size, r.entry.ModTime}
		switch {
		case r.counted:
			w.summary.add(r.verdict)
		case r.skipped:
			w.summary.Skipped++
		case r.gone:
			w.summary.Gone++
		}
	case outcomeChanged:
		if w.o.Once || !w.stopping(ctx) {
			e := r.entry
			w.cands[path] = &candidate{id: e.ID, inbox: e.Inbox, rel: e.Rel, size: e.Size, mtime: e.ModTime, since: time.Now(), state: StateSeen}
		}
	case outcomeRetry:
		if w.o.Once {
			w.summary.Errors++ // left in the ledger for the next run
			return
		}
		w.retry[path] = r.entry
	case outcomeAbandoned:
	}
}

func (w *watcher) stopping(ctx context.Context) bool { return ctx.Err() != nil }

// retryFailed queues again the files whose last step failed.
func (w *watcher) retryFailed() {
	for path, e := range w.retry {
		delete(w.retry, path)
		if w.busy[path] {
			continue
		}
		if e.State == StateJudged {
			w.busy[path] = true
			w.queue = append(w.queue, e)
			continue
		}
		w.cands[path] = &candidate{id: e.ID, inbox: e.Inbox, rel: e.Rel, size: e.Size, mtime: e.ModTime, since: time.Now(), state: StateSeen}
	}
}
