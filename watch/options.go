package watch

import (
	"errors"
	"fmt"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"runtime"
	"time"
)

// Options configure a watcher. Inboxes and Judge are required; every other
// zero value means the default documented beside it.
type Options struct {
	// Inboxes are the folders watched, recursively.
	Inboxes []string
	// State holds the ledger; default: .kweigh inside the first inbox (a
	// hidden name, so it is never watched).
	State string
	// Reports receives the report pair of every file; default: State/reports.
	Reports string
	// Passed and Failed receive the judged files (errors go to Failed),
	// keeping their path below the inbox; empty: files stay where they are.
	Passed, Failed string
	// Settle is how long a file's size and modification time must stay the
	// same before it is taken; default 5 s.
	Settle time.Duration
	// Rescan is the period of the full rescan, the source of truth beside
	// the file-system events; default 60 s.
	Rescan time.Duration
	// Poll, when set, turns file-system events off and rescans this often
	// (network shares that deliver no events).
	Poll time.Duration
	// Ignore are extra temporary-name patterns (path.Match syntax).
	Ignore []string
	// Jobs is how many files are judged at once; default: the CPU count.
	Jobs int
	// Once takes the files present at the start (waiting for them to
	// settle), judges and places them, and returns.
	Once bool
	// Judge judges one file.
	Judge JudgeFunc
	// Notify is a webhook URL; each placed file's record is POSTed to it
	// through the ledger's outbox.
	Notify string
	// NotifyBackoff is the wait before the first retry of a failed
	// notification, doubled at each further failure up to NotifyBackoffMax;
	// defaults 1 s and 10 min.
	NotifyBackoff, NotifyBackoffMax time.Duration
	// Output receives one line per placed file, in Format ("jsonl", the
	// default, or "text"); nil: no lines.
	Output io.Writer
	Format string
	// Log receives the watcher's own messages; nil: discarded.
	Log *slog.Logger
}

// withDefaults checks the options and fills in the defaults.
func (o Options) withDefaults() (Options, error) {
	if len(o.Inboxes) == 0 {
		return o, errors.New("name at least one inbox folder")
	}
	if o.Judge == nil {
		return o, errors.New("watch: Options.Judge is nil")
	}
	for _, in := range o.Inboxes {
		st, err := os.Stat(in)
		if err != nil {
			return o, fmt.Errorf("inbox: %w", err)
		}
		if !st.IsDir() {
			return o, fmt.Errorf("inbox %s: not a folder", in)
		}
	}
	if o.State == "" {
		o.State = filepath.Join(o.Inboxes[0], ".kweigh")
	}
	if o.Reports == "" {
		o.Reports = filepath.Join(o.State, "reports")
	}
	if o.Settle <= 0 {
		o.Settle = 5 * time.Second
	}
	if o.Rescan <= 0 {
		o.Rescan = 60 * time.Second
	}
	if o.Jobs <= 0 {
		o.Jobs = runtime.NumCPU()
	}
	if o.NotifyBackoff <= 0 {
		o.NotifyBackoff = time.Second
	}
	if o.NotifyBackoffMax <= 0 {
		o.NotifyBackoffMax = 10 * time.Minute
	}
	switch o.Format {
	case "":
		o.Format = "jsonl"
	case "jsonl", "text":
	default:
		return o, fmt.Errorf("--format %s: watch writes jsonl or text", o.Format)
	}
	if o.Log == nil {
		o.Log = slog.New(slog.NewTextHandler(io.Discard, nil))
	}
	// A passed or failed folder that is an inbox (or holds one) would feed
	// judged files back in.
	for _, out := range []string{o.Passed, o.Failed} {
		if out == "" {
			continue
		}
		for _, in := range o.Inboxes {
			if within(absPath(in), absPath(out)) {
				return o, fmt.Errorf("%s holds the inbox %s: judged files would come back in", out, in)
			}
		}
	}
	return o, nil
}

func absPath(p string) string {
	a, err := filepath.Abs(p)
	if err != nil {
		return filepath.Clean(p)
	}
	return a
}

// within reports whether path is dir or lies below it.
func within(path, dir string) bool {
	rel, err := filepath.Rel(dir, path)
	return err == nil && rel != ".." && !startsWithDotDot(rel)
}

func startsWithDotDot(rel string) bool {
	return len(rel) >= 3 && rel[:3] == ".."+string(filepath.Separator)
}
