package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"time"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

func checkCommand() *cli.Command {
	flags := append(batchFlags(reports.CheckFormats()),
		&cli.StringFlag{Name: "spec", Aliases: []string{"s"}, Usage: "delivery spec `NAME` for every file: a built-in id (see 'kweigh specs') or a TOML file; without it each file is judged by the nearest kweigh.toml, from its folder upwards"},
		&cli.BoolFlag{Name: "strict", Usage: "treat warnings as failures (exit 1)"},
		&cli.BoolFlag{Name: "detach", Usage: "with --nats: submit the batch, print its id and exit; 'kweigh results' collects it"},
	)
	flags = append(flags, queueFlags(false)...)
	return &cli.Command{
		Name:      "check",
		Usage:     "judge files against a delivery spec: verdict, reasons and the gain that fixes them",
		ArgsUsage: "FILE|DIR|GLOB...",
		Description: "Measures every audio file named (folders recursively) and judges it against its spec: the\n" +
			"spec given by --spec or, without it, the nearest kweigh.toml from the file's folder upwards\n" +
			"(a kweigh.toml with root = true ends the search), so one run can check deliveries for several\n" +
			"outlets. Every check is pass, warn or fail, with the measured value, the limit and\n" +
			"a reason; loudness failures come with the gain that reaches the target and whether a limiter\n" +
			"is needed.\n\n" +
			"Raising gain raises level: audition corrected files at a safe monitoring level. A pass is not\n" +
			"a broadcaster's or regulator's acceptance; local regulation and the receiving party's own QC\n" +
			"decide.\n\n" +
			fmt.Sprintf(exitsHelpFmt, "every file passed (warnings allowed unless --strict)", "at least one file failed its spec (or warned, with --strict)"),
		Flags: flags,
		Action: func(ctx context.Context, cmd *cli.Command) error {
			o, err := readBatchOptions(cmd, reports.CheckFormats())
			if err != nil {
				return err
			}
			co := checkOptions{batchOptions: o, strict: cmd.Bool("strict")}
			if name := cmd.String("spec"); name != "" {
				if co.spec, err = loadSpec(name); err != nil {
					return err
				}
				co.specName = name
			}
			if dial, ok, err := readDial(cmd, "check"); err != nil {
				return err
			} else if ok {
				co.remote = &remoteOptions{dial: dial, detach: cmd.Bool("detach")}
			} else if cmd.Bool("detach") {
				return usagef("--detach needs --nats URL")
			}
			return runCheck(ctx, co, cmd.Args().Slice(), cmd.Root().Writer, cmd.Root().ErrWriter)
		},
	}
}

// checkOptions are check's options beyond the batch ones.
type checkOptions struct {
	batchOptions
	spec     *rules.Spec // from --spec; nil when not given
	specName string      // --spec as given
	strict   bool
	remote   *remoteOptions // --nats: judge through the queue; nil judges here
}

// runCheck measures and judges the files under args.
func runCheck(ctx context.Context, o checkOptions, args []string, stdout, stderr io.Writer) error {
	targets, err := engine.Collect(args)
	if err != nil {
		return usageError{err}
	}
	if len(targets) == 0 {
		return errNoAudio(args)
	}
	specs := engine.NewSpecs()
	if o.spec == nil {
		// When no file has a spec the command line is wrong: say so once
		// instead of failing every file. Files without one among others
		// that have one are reported one by one.
		orphans := 0
		for _, t := range targets {
			var none *engine.NoSpecError
			if _, _, err := specs.Find(t.Path); errors.As(err, &none) {
				orphans++
			}
		}
		if orphans == len(targets) {
			return usagef("no spec: give --spec NAME (see 'kweigh specs') or put a %s in the delivery folder or a folder above it", rules.SpecFileName)
		}
	}

	opt := engine.Options{Spec: o.spec, Specs: specs, Measure: o.measureOptions()}
	if o.remote != nil && o.remote.detach {
		return submitDetached(ctx, o, targets, opt, stdout, stderr)
	}
	return reportCheck(ctx, o, targets, args, stdout, stderr, func(write func(int, engine.Record)) (int, error) {
		if o.remote != nil {
			return runRemote(ctx, o, targets, opt, stderr, write)
		}
		return runBatch(ctx, o.batchOptions, targets, opt, stderr, write), nil
	})
}

// reportCheck writes the records that judgeAll produces (through write) in
// the chosen formats and returns the run's outcome as an error for
// exitCode. judgeAll returns how many targets were left unfinished.
func reportCheck(ctx context.Context, o checkOptions, targets []engine.Target, args []string, stdout, stderr io.Writer,
	judgeAll func(write func(int, engine.Record)) (int, error)) error {
	files, err := prepareOutputs(o.batchOptions, targets)
	if err != nil {
		return err
	}
	defer files.abort()

	specName := ""
	if o.spec != nil {
		specName = o.spec.ID
	}
	opts := reports.Options{Spec: specName, Strict: o.strict, Version: versionString()}
	out, err := openRunOutput(o.batchOptions, files, stdout, opts,
		func(w io.Writer, f reports.Format, opts reports.Options) (recordWriter[*rules.Result], error) {
			return reports.NewCheckWriter(w, f, opts)
		})
	if err != nil {
		return err
	}

	start := time.Now()
	var summary reports.Summary
	var kept []*rules.Result
	var keptSpecs []*rules.Spec
	unfinished, err := judgeAll(
		func(_ int, rec engine.Record) {
			r := rec.Result
			summary.Add(r)
			out.write(r)
			if o.report != "" || o.plots != "" || o.qc.markers != "" {
				kept = append(kept, r)
				keptSpecs = append(keptSpecs, rec.Spec)
			}
		})
	if err != nil {
		return err
	}
	summary.Elapsed = time.Since(start)
	summary.Interrupted = ctx.Err() != nil
	summary.Unfinished = unfinished
	if err := out.close(summary, stderr); err != nil {
		return err
	}
	if summary.Interrupted {
		writeVisuals(files, o.qc, true, stderr, nil, nil, nil)
		return interruption(ctx, unfinished)
	}
	if summary.Files == 0 {
		return errNoAudio(args)
	}
	if err := writeVisuals(files, o.qc, false, stderr, nil, kept, keptSpecs); err != nil {
		return err
	}
	switch {
	case summary.Errors > 0:
		return troubleError{summary.Errors}
	case summary.Failed > 0:
		return failedError{summary.Failed}
	case o.strict && summary.Warned > 0:
		return failedError{summary.Warned}
	}
	return nil
}
