package main

import (
	"context"
	"fmt"
	"io"
	"time"

	"github.com/urfave/cli/v3"

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
		Flags: append(batchFlags(reports.MeasureFormats()), flacFlags()...),
		Action: func(ctx context.Context, cmd *cli.Command) error {
			o, err := readBatchOptions(cmd, reports.MeasureFormats())
			if err != nil {
				return err
			}
			applyFlacFlags(cmd)
			return runMeasure(ctx, o, cmd.Args().Slice(), cmd.Root().Writer, cmd.Root().ErrWriter)
		},
	}
}

// runMeasure measures the files under args and writes them in o.format.
func runMeasure(ctx context.Context, o batchOptions, args []string, stdout, stderr io.Writer) error {
	targets, err := collect(args)
	if err != nil {
		return usageError{err}
	}
	if len(targets) == 0 {
		return errNoAudio(args)
	}
	out, err := openOutputs(o, stdout)
	if err != nil {
		return err
	}
	defer out.close()
	opts := reports.Options{Colour: o.colour && out.console == nil, Version: version}
	primary, err := reports.NewMeasureWriter(out.primary, o.format, opts)
	if err != nil {
		return usageError{err}
	}
	writers := []reports.MeasureWriter{primary}
	if out.console != nil {
		console, _ := reports.NewMeasureWriter(out.console, reports.Text, reports.Options{Colour: o.colour, Version: version})
		writers = append(writers, console)
	}

	start := time.Now()
	var summary reports.Summary
	var kept []*measure.Measurement
	var writeErr error
	mopt := o.measureOptions()
	runBatch(ctx, o, targets, stderr,
		func(i int) (*measure.Measurement, bool) {
			m := measureTarget(targets[i], mopt)
			return m, !skipped(targets[i], m)
		},
		func(_ int, m *measure.Measurement) {
			summary.AddMeasurement(m)
			if m.Damaged != "" {
				summary.Errors++ // measured only in part: not a complete measurement
			}
			for _, w := range writers {
				if err := w.Write(m); err != nil && writeErr == nil {
					writeErr = err
				}
			}
			if o.report != "" || o.plots != "" {
				kept = append(kept, m)
			}
		})
	summary.Elapsed = time.Since(start)
	if err := closeWriters(writers, summary, writeErr); err != nil {
		return err
	}
	if summary.Files == 0 {
		return errNoAudio(args)
	}
	if err := writeVisuals(o, kept, nil, nil); err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("interrupted: %w", err)
	}
	if summary.Errors > 0 {
		return troubleError{summary.Errors}
	}
	return nil
}
