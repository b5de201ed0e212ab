package main

import (
	"context"
	"io"
	"log/slog"
	"runtime"
	"time"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/queue"
	"github.com/kweigh/kweigh/rules"
	"github.com/kweigh/kweigh/watch"
)

func watchCommand() *cli.Command {
	return &cli.Command{
		Name:      "watch",
		Usage:     "hot folder: judge every file that lands in the inboxes, sort it, report it",
		ArgsUsage: "INBOX...",
		Description: "Watches each INBOX recursively (file-system events as hints, a periodic rescan as the truth)\n" +
			"and takes a file once its size and modification time have not changed for --settle and its\n" +
			"name is not a temporary one (hidden, *.part, *.partial, *.tmp, *.crdownload, *.filepart,\n" +
			"--ignore patterns). Each file is judged against --spec or the nearest kweigh.toml, gets a report\n" +
			"pair (REPORTS/<path>.json and .html) and is moved to --passed or --failed (errors go to\n" +
			"--failed), keeping its path below the inbox; nothing is overwritten. One JSON line per file goes\n" +
			"to stdout (the check record plus placed_at and placed_path), logs go to stderr.\n\n" +
			"Every step is kept in a SQLite ledger in --state, so after a crash or kill a restart finishes\n" +
			"the work: every file is judged once and placed once.\n\n" +
			"A pass is not a broadcaster's or regulator's acceptance; local regulation and the receiving\n" +
			"party's own QC decide.\n\n" +
			"EXIT STATUS:\n" +
			"   without --once: 0 after SIGINT or SIGTERM (moves in progress finish; judgements in progress\n" +
			"      are redone on the next start); a second signal ends it at once\n" +
			"   with --once: 0 every file passed (or warned), 1 a file failed, 2 a file could not be judged,\n" +
			"      130 interrupted by SIGINT, 143 by SIGTERM (unfinished files are done by the next run)\n" +
			"   2  the watcher could not start (bad options, no inbox, state folder in use)\n",
		Flags: append([]cli.Flag{
			&cli.StringFlag{Name: "spec", Aliases: []string{"s"}, Usage: "delivery spec `NAME` for every file (built-in id or TOML file); without it each file's nearest kweigh.toml, as for check"},
			&cli.BoolFlag{Name: "strict", Usage: "treat warnings as failures (the file goes to --failed)"},
			&cli.StringFlag{Name: "passed", Usage: "move files that pass (or warn) into `DIR`"},
			&cli.StringFlag{Name: "failed", Usage: "move files that fail or cannot be judged into `DIR`"},
			&cli.StringFlag{Name: "reports", Usage: "write each file's report pair into `DIR` (default: STATE/reports)"},
			&cli.StringFlag{Name: "state", Usage: "keep the ledger in `DIR` (default: .kweigh inside the first inbox)"},
			&cli.DurationFlag{Name: "settle", Value: 5 * time.Second, Usage: "take a file once its size and time have not changed for this long"},
			&cli.DurationFlag{Name: "rescan", Value: 60 * time.Second, Usage: "rescan the inboxes this often (the source of truth beside events)"},
			&cli.DurationFlag{Name: "poll", Usage: "no file-system events: rescan this often (network shares)"},
			&cli.StringSliceFlag{Name: "ignore", Usage: "also leave alone names matching `PATTERN` (repeatable; a pattern with / matches the path below the inbox)"},
			&cli.StringFlag{Name: "notify", Usage: "POST each file's JSON record to `URL` (undelivered ones are kept and retried)"},
			&cli.BoolFlag{Name: "once", Usage: "judge and place what is in the inboxes now (after it settles), then exit with check's status"},
			&cli.IntFlag{Name: "jobs", Aliases: []string{"j"}, Value: runtime.NumCPU(), Usage: "files judged at once"},
			&cli.StringFlag{Name: "format", Aliases: []string{"f"}, Value: "jsonl", Usage: "stdout lines: jsonl or text"},
			&cli.StringFlag{Name: "layout", Usage: "channel layout for files without (or with a wrong) one: mono, stereo, 5.1 … or labels"},
			&cli.BoolFlag{Name: "skip-flac-md5", Usage: "do not verify FLAC audio against its MD5 signature"},
		}, queueFlags(false)...),
		Action: func(ctx context.Context, cmd *cli.Command) error {
			o, jo, err := readWatchOptions(cmd)
			if err != nil {
				return err
			}
			dial, remote, err := readDial(cmd, "watch")
			if err != nil {
				return err
			}
			if remote {
				// Every file is judged by the queue's workers; the watcher
				// keeps the ledger, the placement and the reports.
				q, err := queue.Connect(ctx, dial)
				if err != nil {
					return usageError{err}
				}
				defer q.Close()
				jo.Remote = queueJudge(q, jo.Spec, jo.Measure)
			}
			o.Judge = watch.CheckJudge(jo)
			return runWatch(ctx, o, cmd.Root().ErrWriter)
		},
	}
}

// readWatchOptions turns the flags into the watcher's options and the
// options of its judge (the judge itself is made by the command, which may
// hand the judging to a queue).
func readWatchOptions(cmd *cli.Command) (watch.Options, watch.JudgeOptions, error) {
	jo := watch.JudgeOptions{Strict: cmd.Bool("strict"), Version: version, Caution: cautionText,
		Measure: measure.Options{Decode: decode.Options{SkipMD5: cmd.Bool("skip-flac-md5")}}}
	fail := func(err error) (watch.Options, watch.JudgeOptions, error) { return watch.Options{}, jo, err }
	if cmd.Args().Len() == 0 {
		return fail(usagef("name at least one inbox folder"))
	}
	if name := cmd.String("spec"); name != "" {
		spec, err := loadSpec(name)
		if err != nil {
			return fail(err)
		}
		jo.Spec = spec
	}
	if l := cmd.String("layout"); l != "" {
		layout, err := decode.ParseLayout(l)
		if err != nil {
			return fail(usageError{err})
		}
		jo.Measure.Layout = layout
	}
	if cmd.Int("jobs") < 1 {
		return fail(usagef("--jobs must be at least 1"))
	}
	for _, d := range []string{"settle", "rescan"} {
		if cmd.Duration(d) <= 0 {
			return fail(usagef("--%s must be longer than 0", d))
		}
	}
	if cmd.Duration("poll") < 0 {
		return fail(usagef("--poll must be longer than 0"))
	}
	f := cmd.String("format")
	if f != "jsonl" && f != "text" {
		return fail(usagef("--format %s: watch writes jsonl or text", f))
	}
	return watch.Options{
		Inboxes: cmd.Args().Slice(),
		State:   cmd.String("state"), Reports: cmd.String("reports"),
		Passed: cmd.String("passed"), Failed: cmd.String("failed"),
		Settle: cmd.Duration("settle"), Rescan: cmd.Duration("rescan"), Poll: cmd.Duration("poll"),
		Ignore: cmd.StringSlice("ignore"), Jobs: cmd.Int("jobs"), Once: cmd.Bool("once"),
		Notify: cmd.String("notify"), Format: f, Output: cmd.Root().Writer,
	}, jo, nil
}

// queueJudge judges one file through the queue (its workers measure and
// judge it with spec, or the file's nearest kweigh.toml whose text travels
// with the job), for the hot folder and the upload gate.
func queueJudge(q *queue.Queue, spec *rules.Spec, mo measure.Options) func(context.Context, engine.Target, engine.Options) (engine.Record, error) {
	return func(ctx context.Context, t engine.Target, opt engine.Options) (engine.Record, error) {
		so := queue.SubmitOptions{Spec: spec, Specs: engine.NewSpecs(), Layout: mo.Layout, KeepSeries: true, SkipMD5: mo.Decode.SkipMD5}
		if spec != nil {
			ref, err := queue.SpecRefOf(spec)
			if err != nil {
				return engine.Record{}, err
			}
			so.SpecRef = ref
		}
		return q.JudgeOne(ctx, t, so)
	}
}

// runWatch runs the watcher until SIGINT/SIGTERM cancel ctx (main's signal
// handling; a second signal ends the process at once) or, with --once,
// until the files present are placed.
func runWatch(ctx context.Context, o watch.Options, stderr io.Writer) error {
	o.Log = slog.New(slog.NewTextHandler(stderr, nil))
	sum, err := watch.Run(ctx, o)
	if err != nil {
		return usageError{err}
	}
	if !o.Once {
		return nil
	}
	o.Log.Info("done", "files", sum.Files, "passed", sum.Passed, "warned", sum.Warned, "failed", sum.Failed,
		"errors", sum.Errors, "skipped", sum.Skipped, "gone", sum.Gone)
	switch {
	case ctx.Err() != nil:
		return interruption(ctx, 0)
	case sum.Errors > 0:
		return troubleError{sum.Errors}
	case sum.Failed > 0:
		return failedError{sum.Failed}
	}
	return nil
}
