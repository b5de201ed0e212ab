package watch

import (
	"bytes"
	"context"
	"fmt"
	"path/filepath"
	"time"

	"github.com/kweigh/kweigh/engine"
	// CheckJudge reads every format kweigh reads.
	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/reports/htmlpage"
	"github.com/kweigh/kweigh/rules"
)

// JudgeOptions configure CheckJudge.
type JudgeOptions struct {
	// Spec judges every file; nil means each file's nearest kweigh.toml
	// (the engine's search, the same as `kweigh check`).
	Spec *rules.Spec
	// Strict turns warnings into failures (the file goes to Failed).
	Strict bool
	// Measure are the measurement options; KeepSeries is always set, the
	// HTML page draws the series.
	Measure measure.Options
	// Version is the kweigh version written into the records.
	Version string
	// Caution heads every HTML page (hearing and not-an-acceptance notice).
	Caution string
	// Remote, when set, judges instead of engine.JudgeTarget (e.g. a work
	// queue's JudgeOne); its error means the file was not judged (the queue
	// is unreachable) and the file is tried again later.
	Remote func(ctx context.Context, t engine.Target, opt engine.Options) (engine.Record, error)
}

// CheckJudge returns the JudgeFunc of `kweigh check`: engine.JudgeTarget
// (measure the file, judge it against its spec), then the check record
// (JSON) and the HTML QC page rendered from the result.
func CheckJudge(o JudgeOptions) JudgeFunc {
	o.Measure.KeepSeries = true
	opt := engine.Options{Spec: o.Spec, Measure: o.Measure}
	return func(ctx context.Context, path, root string) (Judgement, error) {
		// Found in a folder: the engine skips a file that is not audio unless
		// its name says it is (then it is a damaged delivery, an error).
		t := engine.Target{Path: path, Root: root}
		var rec engine.Record
		if o.Remote != nil {
			var err error
			if rec, err = o.Remote(ctx, t, opt); err != nil {
				return Judgement{}, err
			}
		} else {
			rec = engine.JudgeTarget(ctx, t, opt)
		}
		if rec.Interrupted() {
			return Judgement{}, ctx.Err()
		}
		if rec.Skipped || rec.Result == nil {
			return Judgement{Skipped: true, Problem: rec.Measurement.Error}, nil
		}
		r := rec.Result
		verdict := r.Verdict
		if o.Strict && verdict == rules.Warn {
			verdict = rules.Fail
		}
		var line bytes.Buffer
		w, err := reports.NewCheckWriter(&line, reports.JSONL, reports.Options{Version: o.Version})
		if err == nil {
			err = w.Write(r)
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
			Entries:   []htmlpage.Entry{{Result: r, Target: htmlpage.TargetFor(rec.Spec, r.Channels)}},
			Caution:   o.Caution,
		})
		if err != nil {
			return Judgement{}, fmt.Errorf("%s: writing the page: %w", path, err)
		}
		return Judgement{Verdict: string(verdict), Problem: r.Error, Record: bytes.TrimSpace(line.Bytes()), Page: page.Bytes()}, nil
	}
}
