package watch

import (
	"context"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/fsnotify/fsnotify"
)

// scanAll walks every inbox: the source of truth, whatever the events said.
func (w *watcher) scanAll(ctx context.Context) {
	w.present = map[string]bool{}
	for _, in := range w.inboxes {
		w.scanDir(ctx, in, in)
	}
	w.commit(ctx)
	// Forget finished versions no longer in the inboxes (moved away, or
	// deleted), so a watcher that runs for months keeps only what is there.
	for path := range w.finished {
		if !w.present[path] {
			delete(w.finished, path)
		}
	}
	for path := range w.complain {
		if !w.present[path] {
			delete(w.complain, path)
		}
	}
	w.present = nil
}

// scanDir walks dir (inside inbox), observing every delivery and, with
// events on, watching every folder it passes (a folder created after the
// start is watched from its first scan on; files created in it before the
// watch was added are found by this walk).
func (w *watcher) scanDir(ctx context.Context, inbox, dir string) {
	now := time.Now()
	filepath.WalkDir(dir, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			if path == dir && errors.Is(err, fs.ErrNotExist) {
				return nil // an event for a folder already gone
			}
			w.log.Error("cannot read folder", "folder", path, "err", err)
			if d != nil && d.IsDir() {
				return fs.SkipDir
			}
			return nil
		}
		if d.IsDir() {
			if path != inbox && (strings.HasPrefix(d.Name(), ".") || w.skipped(path)) {
				return fs.SkipDir
			}
			if w.events != nil {
				w.events.add(path, w.log)
			}
			return nil
		}
		rel, err := filepath.Rel(inbox, path)
		if err != nil {
			return nil
		}
		rel = filepath.ToSlash(rel)
		if w.names.Temporary(rel) {
			return nil
		}
		if w.present != nil {
			w.present[path] = true
		}
		st, err := os.Stat(path) // follows symlinks to files
		if err != nil {
			if !errors.Is(err, fs.ErrNotExist) {
				w.log.Error("cannot look at file", "file", path, "err", err)
			}
			return nil
		}
		if !st.Mode().IsRegular() {
			if !w.complain[path] {
				w.complain[path] = true
				w.log.Warn("not a regular file: left alone", "file", path)
			}
			return nil
		}
		w.observe(ctx, inbox, rel, st, now)
		return nil
	})
}

// skipped reports whether path is one of the watcher's own folders.
func (w *watcher) skipped(path string) bool {
	abs := absPath(path)
	for _, s := range w.skip {
		if abs == s {
			return true
		}
	}
	return false
}

// inboxOf returns the inbox that holds path.
func (w *watcher) inboxOf(path string) (string, bool) {
	best := ""
	for _, in := range w.inboxes {
		if within(path, in) && len(in) > len(best) {
			best = in
		}
	}
	return best, best != ""
}

// hint handles a file-system event: only a prompt to look.
func (w *watcher) hint(ctx context.Context, h hint) {
	inbox, ok := w.inboxOf(h.path)
	if !ok {
		return
	}
	st, err := os.Lstat(h.path)
	if err != nil {
		return // gone again; a candidate's absence is noticed by settleTick
	}
	if st.IsDir() {
		if h.created {
			w.scanDir(ctx, inbox, h.path) // watch it, and find what was made before the watch
		}
		return
	}
	rel, err := filepath.Rel(inbox, h.path)
	if err != nil {
		return
	}
	rel = filepath.ToSlash(rel)
	if w.names.Temporary(rel) || w.hiddenOrOwn(inbox, h.path) {
		return
	}
	st, err = os.Stat(h.path)
	if err != nil || !st.Mode().IsRegular() {
		return
	}
	// No commit here: a file being copied sends an event per write, and the
	// next settle tick commits whatever changed, before anything acts on it.
	w.observe(ctx, inbox, rel, st, time.Now())
}

// hiddenOrOwn reports whether path lies in one of the watcher's own folders.
func (w *watcher) hiddenOrOwn(inbox, path string) bool {
	for dir := filepath.Dir(path); within(dir, inbox) && dir != inbox; dir = filepath.Dir(dir) {
		if w.skipped(dir) {
			return true
		}
	}
	return false
}

// hint is one file-system event, reduced to what the loop needs.
type hint struct {
	path    string
	created bool
}

// events turns fsnotify's events into hints.
type events struct {
	fs     *fsnotify.Watcher
	hints  chan hint
	warned map[string]bool // folders whose watch failed, logged once
	done   chan struct{}
}

func newEvents() (*events, error) {
	fw, err := fsnotify.NewWatcher()
	if err != nil {
		return nil, err
	}
	e := &events{fs: fw, hints: make(chan hint, 256), warned: map[string]bool{}, done: make(chan struct{})}
	go e.pump()
	return e, nil
}

// add watches one folder. Adding a folder already watched changes nothing,
// and a folder deleted and made again is watched anew, so every scan simply
// adds every folder it passes.
func (e *events) add(dir string, log interface{ Warn(string, ...any) }) {
	if err := e.fs.Add(dir); err != nil && !e.warned[dir] {
		e.warned[dir] = true
		log.Warn("cannot watch folder; rescans still find its files", "folder", dir, "err", err)
	}
}

func (e *events) pump() {
	defer close(e.hints)
	for {
		select {
		case ev, ok := <-e.fs.Events:
			if !ok {
				return
			}
			if ev.Op == fsnotify.Chmod {
				continue
			}
			h := hint{path: ev.Name, created: ev.Op.Has(fsnotify.Create)}
			select {
			case e.hints <- h:
			default: // the loop is busy; the next rescan or settle tick sees the change
			}
		case _, ok := <-e.fs.Errors:
			if !ok {
				return
			}
			// An overflow loses events; the rescan is the source of truth.
		case <-e.done:
			return
		}
	}
}

func (e *events) close() {
	close(e.done)
	e.fs.Close()
}
