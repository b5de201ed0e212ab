package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
)

// batchOptions are the options measure and check share.
type batchOptions struct {
	format reports.Format
	output string // file for the chosen format; stdout then gets text
	jobs   int
	layout []string
	report string // HTML report file
	plots  string // folder for standalone SVG plots
	colour bool
	decode decode.Options
	qc     qcOptions
}

func batchFlags(formats []reports.Format) []cli.Flag {
	names := make([]string, len(formats))
	for i, f := range formats {
		names[i] = string(f)
	}
	return append([]cli.Flag{
		&cli.StringFlag{Name: "format", Aliases: []string{"f"}, Value: "text", Usage: "output format: " + strings.Join(names, ", ")},
		&cli.StringFlag{Name: "output", Aliases: []string{"o"}, Usage: "write the chosen format to `FILE`; the terminal still gets the text report"},
		&cli.IntFlag{Name: "jobs", Aliases: []string{"j"}, Value: runtime.NumCPU(), Usage: "cores used at once, shared by the files and by the sections of a long WAV or AIFF file"},
		&cli.StringFlag{Name: "layout", Usage: "channel layout for files without (or with a wrong) one: mono, stereo, 5.0, 5.1, 7.1 or labels like L,R,C,LFE,Ls,Rs"},
		&cli.StringFlag{Name: "report", Usage: "also write a self-contained HTML QC page to `FILE`"},
		&cli.StringFlag{Name: "plots", Usage: "also write each file's loudness plot as an SVG into `DIR`"},
		&cli.BoolFlag{Name: "skip-flac-md5", Usage: "do not verify FLAC audio against its MD5 signature (faster; frame CRCs are still checked)"},
		&cli.StringFlag{Name: "ffmpeg", Usage: "the ffmpeg that reads MP4/M4A, MOV, MXF, AC-3, ADTS AAC, Ogg Vorbis and Matroska (`PATH`; ffprobe is looked for beside it; default $KWEIGH_FFMPEG, else ffmpeg on PATH)"},
		&cli.IntFlag{Name: "stream", Usage: "measure only audio stream `N` (from 1) of a file with several; default all of them as one programme"},
	}, qcFlags()...)
}

func readBatchOptions(cmd *cli.Command, formats []reports.Format) (batchOptions, error) {
	var o batchOptions
	f, err := reports.ParseFormat(cmd.String("format"))
	if err != nil {
		return o, usageError{err}
	}
	allowed := false
	for _, a := range formats {
		allowed = allowed || a == f
	}
	if !allowed {
		return o, usagef("--format %s is not available for %s", f, cmd.Name)
	}
	o.format = f
	o.output = cmd.String("output")
	o.jobs = cmd.Int("jobs")
	if o.jobs < 1 {
		return o, usagef("--jobs must be at least 1")
	}
	if l := cmd.String("layout"); l != "" {
		if o.layout, err = decode.ParseLayout(l); err != nil {
			return o, usageError{err}
		}
	}
	o.decode = decode.Options{SkipMD5: cmd.Bool("skip-flac-md5"), FFmpeg: cmd.String("ffmpeg"), Stream: cmd.Int("stream")}
	if o.decode.Stream < 0 {
		return o, usagef("--stream counts from 1")
	}
	o.report = cmd.String("report")
	o.plots = cmd.String("plots")
	o.colour = isTerminal(cmd.Root().Writer) && os.Getenv("NO_COLOR") == ""
	if o.qc, err = readQCOptions(cmd); err != nil {
		return o, err
	}
	if cmd.Args().Len() == 0 {
		return o, usagef("name at least one file or folder")
	}
	return o, nil
}

// measureOptions turns batch options into the measurement's.
func (o batchOptions) measureOptions() measure.Options {
	return o.qc.apply(measure.Options{Layout: o.layout, KeepSeries: o.report != "" || o.plots != "", Decode: o.decode, Digest: o.report != ""})
}

// recordWriter is what package reports gives for either command: a
// streaming writer of one kind of record.
type recordWriter[T any] interface {
	Write(T) error
	Close(reports.Summary) error
}

// runOutput is where a run's records go: the chosen format to --output (or
// stdout) and, when --output is given, the text report to stdout as well.
// It keeps the first error of writing so that one failing output neither
// stops the run nor goes unreported.
type runOutput[T any] struct {
	file    *pendingFile // the --output file, nil without it
	writers []recordWriter[T]
	err     error
	// held is CSV meant for stdout, kept until the run is complete: a CSV
	// table cannot say that rows are missing, so an interrupted run
	// writes none (the exit status and stderr say why).
	held   *bytes.Buffer
	stdout io.Writer
}

// openRunOutput sets up the run's record writers on the prepared output
// files. newWriter is the reports constructor for the command's record
// type; colour goes only to a terminal.
func openRunOutput[T any](o batchOptions, files *runFiles, stdout io.Writer, opts reports.Options,
	newWriter func(io.Writer, reports.Format, reports.Options) (recordWriter[T], error)) (*runOutput[T], error) {
	out := &runOutput[T]{file: files.output, stdout: stdout}
	primary := stdout
	switch {
	case out.file != nil:
		primary = out.file
	case o.format == reports.CSV:
		out.held = &bytes.Buffer{}
		primary = out.held
	}
	terminal := opts
	opts.Colour = o.colour && out.file == nil
	w, err := newWriter(primary, o.format, opts)
	if err != nil {
		return nil, usageError{err}
	}
	out.writers = append(out.writers, w)
	if out.file != nil {
		terminal.Colour = o.colour
		console, err := newWriter(stdout, reports.Text, terminal)
		if err != nil {
			return nil, err
		}
		out.writers = append(out.writers, console)
	}
	return out, nil
}

// write hands one record to every writer.
func (r *runOutput[T]) write(rec T) {
	for _, w := range r.writers {
		if err := w.Write(rec); err != nil && r.err == nil {
			r.err = err
		}
	}
}

// close closes the writers with the summary and returns the first error
// of the whole run's output. The --output file is renamed into place only
// when the run is complete and every write succeeded; otherwise any
// previous file of that name stays as it was.
func (r *runOutput[T]) close(summary reports.Summary, stderr io.Writer) error {
	for _, w := range r.writers {
		if err := w.Close(summary); err != nil && r.err == nil {
			r.err = err
		}
	}
	if r.held != nil {
		if summary.Interrupted {
			fmt.Fprintln(stderr, "kweigh: interrupted: the CSV table is not written (it could not show which files are missing)")
		} else if _, err := r.stdout.Write(r.held.Bytes()); err != nil && r.err == nil {
			r.err = err
		}
	}
	if r.file == nil {
		return r.err
	}
	switch {
	case r.err != nil:
		r.file.abort()
		r.err = fmt.Errorf("--output %s not written: %w", r.file.final, r.err)
	case summary.Interrupted:
		r.file.abort()
		fmt.Fprintf(stderr, "kweigh: interrupted: --output %s not written (a previous file of that name is kept)\n", r.file.final)
	default:
		if err := r.file.commit(); err != nil {
			r.err = fmt.Errorf("--output: %w", err)
		}
	}
	return r.err
}

func noteSkipped(stderr io.Writer, paths []string) {
	if len(paths) == 0 {
		return
	}
	fmt.Fprintf(stderr, "kweigh: skipped %d file(s) that are not audio: %s\n", len(paths), reports.Printable(strings.Join(paths, ", ")))
}

// errNoAudio is returned when a run found nothing to measure: an empty
// delivery must not pass a gate silently.
func errNoAudio(args []string) error {
	return usagef("no audio files found in %s", strings.Join(args, ", "))
}

// runBatch judges (or measures) every target with engine.Run on o.jobs
// workers and hands each record to write: in target order for document
// formats (as soon as every earlier record is in, so text output is
// progressive but stable), in completion order for streaming formats. Files
// found in folders that are not audio are left out and noted on stderr at
// the end. A progress bar runs on a terminal.
//
// It returns how many targets were left unfinished: never started, or
// stopped part-way, because ctx was cancelled. Records of stopped files are
// not handed to write: they hold no complete measurement.
func runBatch(ctx context.Context, o batchOptions, targets []engine.Target, opt engine.Options, stderr io.Writer, write func(i int, r engine.Record)) (unfinished int) {
	var skippedPaths []string
	done := 0
	bar := newProgress(stderr, len(targets))
	// The same budget of cores for every file of the run: a lone long
	// file is measured on all of them, a batch one file per core.
	opt.Measure.Cores = measure.NewCores(o.jobs)
	engine.Run(ctx, targets, o.jobs,
		func(ctx context.Context, t engine.Target) engine.Record { return engine.JudgeTarget(ctx, t, opt) },
		func(i int, r engine.Record) {
			bar.step()
			if r.Interrupted() {
				return
			}
			done++
			if r.Skipped {
				skippedPaths = append(skippedPaths, r.Target.Path)
				return
			}
			write(i, r)
		},
		!o.format.Streaming())
	bar.done()
	noteSkipped(stderr, skippedPaths)
	return len(targets) - done
}
