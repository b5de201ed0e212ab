package main

import (
	"context"
	"fmt"
	"io"
	"time"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
)

func measureCommand() *cli.Command {
	return &cli.Command{
		Name:      "measure",
		Usage:     "measure loudness, loudness range and true peak of files and folders",
		ArgsUsage: "FILE|DIR|GLOB...",
		Description: "Measures every audio file named (folders are walked recursively; files that are not audio are\n" +
			"skipped with a note) per ITU-R BS.1770 and EBU Tech 3341/3342. Files are measured in parallel\n" +
			"and listed in a stable order; --format jsonl writes each file as soon as it is done.\n\n" +
			fmt.Sprintf(exitsHelpFmt, "every file was measured", "(not used by measure)"),
		Flags: batchFlags(reports.MeasureFormats()),
		Action: func(ctx context.Context, cmd *cli.Command) error {
			o, err := readBatchOptions(cmd, reports.MeasureFormats())
			if err != nil {
				return err
			}
			return runMeasure(ctx, o, cmd.Args().Slice(), cmd.Root().Writer, cmd.Root().ErrWriter)
		},
	}
}

// runMeasure measures the files under args and writes them in o.format.
func runMeasure(ctx context.Context, o batchOptions, args []string, stdout, stderr io.Writer) error {
	targets, err := engine.Collect(args)
	if err != nil {
		return usageError{err}
	}
	if len(targets) == 0 {
		return errNoAudio(args)
	}
	files, err := prepareOutputs(o, targets)
	if err != nil {
		return err
	}
	defer files.abort()
	out, err := openRunOutput(o, files, stdout, reports.Options{Version: versionString()},
		func(w io.Writer, f reports.Format, opts reports.Options) (recordWriter[*measure.Measurement], error) {
			return reports.NewMeasureWriter(w, f, opts)
		})
	if err != nil {
		return err
	}

	start := time.Now()
	var summary reports.Summary
	var kept []*measure.Measurement
	opt := engine.Options{MeasureOnly: true, Measure: o.measureOptions()}
	unfinished := runBatch(ctx, o, targets, opt, stderr,
		func(_ int, r engine.Record) {
			m := r.Measurement
			summary.AddMeasurement(m)
			out.write(m)
			if o.report != "" || o.plots != "" || o.qc.markers != "" {
				kept = append(kept, m)
			}
		})
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
	if err := writeVisuals(files, o.qc, false, stderr, kept, nil, nil); err != nil {
		return err
	}
	// A damaged file, or one with audio past what its header declares, is
	// not a complete measurement: exit 2 as for errors.
	if n := summary.Errors + summary.Damaged + summary.Undeclared; n > 0 {
		return troubleError{n}
	}
	return nil
}
