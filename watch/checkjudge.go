package watch

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/reports/htmlpage"
	"github.com/kweigh/kweigh/rules"
)

// JudgeOptions configure CheckJudge.
type JudgeOptions struct {
	// Spec judges every file; nil means each file's nearest kweigh.toml,
	// looked for from its folder up to the inbox.
	Spec *rules.Spec
	// Strict turns warnings into failures (the file goes to --failed).
	Strict bool
	// Measure are the measurement options; KeepSeries is always set, the
	// HTML page draws the series.
	Measure measure.Options
	// Version is the kweigh version written into the records.
	Version string
	// Caution heads every HTML page (hearing and not-an-acceptance notice).
	Caution string
}

// audioExtensions are the names that make a file a delivery even when it
// cannot be read (an unreadable .wav is an error, not a file to skip).
var audioExtensions = map[string]bool{
	".wav": true, ".bwf": true, ".rf64": true, ".w64": true, ".bw64": true, ".flac": true,
	".mp3": true, ".aif": true, ".aiff": true, ".aifc": true,
}

// CheckJudge returns the JudgeFunc of `kweigh check`: measure the file,
// judge it against its spec, and render the check record (JSON) and the
// HTML QC page.
func CheckJudge(o JudgeOptions) JudgeFunc {
	o.Measure.KeepSeries = true
	specs := &folderSpecs{cache: map[string]specLoad{}}
	return func(ctx context.Context, path, root string) (Judgement, error) {
		m := measure.File(ctx, path, o.Measure)
		if ctx.Err() != nil && m.Err != nil && errors.Is(m.Err, ctx.Err()) {
			return Judgement{}, ctx.Err()
		}
		if m.Err != nil && errors.Is(m.Err, decode.ErrUnknownFormat) && !audioExtensions[strings.ToLower(filepath.Ext(path))] {
			return Judgement{Skipped: true, Problem: m.Error}, nil
		}
		spec := o.Spec
		if spec == nil {
			var err error
			if spec, err = specs.find(path, root); err != nil {
				m = &measure.Measurement{Path: path, Error: err.Error(), Err: err, Notes: []string{}}
				spec = &rules.Spec{ID: "none"}
			}
		}
		r := rules.Evaluate(spec, m)
		verdict := r.Verdict
		if o.Strict && verdict == rules.Warn {
			verdict = rules.Fail
		}
		var rec bytes.Buffer
		w, err := reports.NewCheckWriter(&rec, reports.JSONL, reports.Options{Version: o.Version})
		if err == nil {
			err = w.Write(&r)
		}
		if err == nil {
			err = w.Close(reports.Summary{})
		}
		if err != nil {
			return Judgement{}, fmt.Errorf("%s: writing the record: %w", path, err)
		}
		var page bytes.Buffer
		err = htmlpage.Write(&page, htmlpage.Page{
			Title:     "kweigh delivery check — " + filepath.Base(path),
			Generated: time.Now(),
			Specs:     []string{r.Spec},
			Entries:   []htmlpage.Entry{{Result: &r, Target: htmlpage.TargetFor(spec, r.Channels)}},
			Caution:   o.Caution,
		})
		if err != nil {
			return Judgement{}, fmt.Errorf("%s: writing the page: %w", path, err)
		}
		j := Judgement{Verdict: string(verdict), Record: bytes.TrimSpace(rec.Bytes()), Page: page.Bytes()}
		if r.Error != "" {
			j.Problem = r.Error
		}
		return j, nil
	}
}

// folderSpecs finds and caches the nearest kweigh.toml of each file. A spec
// file is read again when its modification time changes, so a QC desk can
// edit a folder's rules without restarting the watcher.
type folderSpecs struct {
	mu    sync.Mutex
	cache map[string]specLoad
}

type specLoad struct {
	mtime time.Time
	spec  *rules.Spec
	err   error
}

func (f *folderSpecs) find(path, root string) (*rules.Spec, error) {
	dir := filepath.Dir(path)
	root = filepath.Clean(root)
	for {
		file := filepath.Join(dir, specFileName)
		if st, err := os.Stat(file); err == nil && !st.IsDir() {
			return f.load(file, st.ModTime())
		}
		if dir == root || !strings.HasPrefix(dir, root) {
			break
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			break
		}
		dir = parent
	}
	return nil, fmt.Errorf("%s: no spec: give --spec NAME, or put a %s in its folder or the inbox", path, specFileName)
}

func (f *folderSpecs) load(file string, mtime time.Time) (*rules.Spec, error) {
	f.mu.Lock()
	defer f.mu.Unlock()
	if s, ok := f.cache[file]; ok && s.mtime.Equal(mtime) {
		return s.spec, s.err
	}
	spec, err := rules.LoadFile(file)
	f.cache[file] = specLoad{mtime: mtime, spec: spec, err: err}
	return spec, err
}
