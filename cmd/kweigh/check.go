package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

func checkCommand() *cli.Command {
	flags := append(batchFlags(reports.CheckFormats()),
		&cli.StringFlag{Name: "spec", Aliases: []string{"s"}, Usage: "delivery spec `NAME` for every file: a built-in id (see 'kweigh specs') or a TOML file; without it each file is judged by the kweigh.toml of its folder (or the nearest folder above, up to the path named)"},
		&cli.BoolFlag{Name: "strict", Usage: "treat warnings as failures (exit 1)"},
	)
	return &cli.Command{
		Name:      "check",
		Usage:     "judge files against a delivery spec: verdict, reasons and the gain that fixes them",
		ArgsUsage: "FILE|DIR|GLOB...",
		Description: "Measures every audio file named (folders recursively) and judges it against its spec: the\n" +
			"spec given by --spec or, without it, the kweigh.toml of the file's folder, so one run can check\n" +
			"deliveries for several outlets. Every check is pass, warn or fail, with the measured value, the limit and\n" +
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
			}
			return runCheck(ctx, co, cmd.Args().Slice(), cmd.Root().Writer, cmd.Root().ErrWriter)
		},
	}
}

// checkOptions are check's options beyond the batch ones.
type checkOptions struct {
	batchOptions
	spec   *rules.Spec // from --spec; nil when not given
	strict bool
}

// specFinder resolves each file's spec: --spec when given (an explicit
// choice wins), else the nearest kweigh.toml between the file and the path
// it was found under. Parsed folder specs are cached; a broken one is
// reported for each file it governs.
type specFinder struct {
	given *rules.Spec
	mu    sync.Mutex
	cache map[string]specOrError
}

// noSpecError is a file with neither a folder spec nor --spec.
type noSpecError struct{ path string }

func (e noSpecError) Error() string {
	return fmt.Sprintf("%s: no spec: give --spec NAME, or put a %s in its folder", e.path, folderSpecName)
}

type specOrError struct {
	spec *rules.Spec
	err  error
}

func (f *specFinder) find(t target) (*rules.Spec, error) {
	if f.given != nil {
		return f.given, nil
	}
	dir := filepath.Dir(t.path)
	root := filepath.Clean(t.root)
	for {
		if s, ok := f.load(filepath.Join(dir, folderSpecName)); ok {
			return s.spec, s.err
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
	return nil, noSpecError{t.path}
}

func (f *specFinder) load(path string) (specOrError, bool) {
	f.mu.Lock()
	defer f.mu.Unlock()
	if s, ok := f.cache[path]; ok {
		return s, s.spec != nil || s.err != nil
	}
	var s specOrError
	if fileExists(path) {
		s.spec, s.err = rules.LoadFile(path)
	}
	f.cache[path] = s
	return s, s.spec != nil || s.err != nil
}

// runCheck measures and judges the files under args.
func runCheck(ctx context.Context, o checkOptions, args []string, stdout, stderr io.Writer) error {
	targets, err := collect(args)
	if err != nil {
		return usageError{err}
	}
	if len(targets) == 0 {
		return errNoAudio(args)
	}
	finder := &specFinder{given: o.spec, cache: map[string]specOrError{}}
	if o.spec == nil {
		// When no file has a spec the command line is wrong: say so once
		// instead of failing every file. Files without one among others
		// that have one are reported one by one.
		orphans := 0
		for _, t := range targets {
			var none noSpecError
			if _, err := finder.find(t); errors.As(err, &none) {
				orphans++
			}
		}
		if orphans == len(targets) {
			return usagef("no spec: give --spec NAME (see 'kweigh specs') or put a %s in the delivery folder", folderSpecName)
		}
	}

	specName := ""
	if o.spec != nil {
		specName = o.spec.ID
	}
	opts := reports.Options{Spec: specName, Strict: o.strict, Version: version}
	out, err := openRunOutput(o.batchOptions, stdout, opts,
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
	specs := make([]*rules.Spec, len(targets))
	mopt := o.measureOptions()
	runBatch(ctx, o.batchOptions, targets, stderr,
		func(i int) (*rules.Result, bool) {
			t := targets[i]
			spec, specErr := finder.find(t)
			specs[i] = spec
			var none noSpecError
			if specErr != nil && !errors.As(specErr, &none) {
				// A broken folder spec: no point measuring.
				return specFailure(t, spec, specErr), true
			}
			m := measureTarget(ctx, t, mopt)
			if skipped(t, m) {
				return nil, false
			}
			if specErr != nil {
				return specFailure(t, spec, specErr), true
			}
			r := rules.Evaluate(spec, m)
			return &r, true
		},
		func(i int, r *rules.Result) {
			summary.Add(r)
			out.write(r)
			if o.report != "" || o.plots != "" {
				kept = append(kept, r)
				keptSpecs = append(keptSpecs, specs[i])
			}
		})
	summary.Elapsed = time.Since(start)
	if err := out.close(summary); err != nil {
		return err
	}
	if summary.Files == 0 {
		return errNoAudio(args)
	}
	if err := writeVisuals(o.batchOptions, nil, kept, keptSpecs); err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("interrupted: %w", err)
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

// specFailure is the result for a file whose spec could not be resolved;
// the error names the missing or broken spec.
func specFailure(t target, spec *rules.Spec, err error) *rules.Result {
	if spec == nil {
		spec = &rules.Spec{ID: "none"}
	}
	m := &measure.Measurement{Path: t.path, Error: err.Error(), Err: err, Notes: []string{}}
	r := rules.Evaluate(spec, m)
	return &r
}
