package main

import (
	"context"
	"fmt"
	"io"
	"os"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/queue"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

func resultsCommand() *cli.Command {
	formats := reports.CheckFormats()
	var flags []cli.Flag
	for _, f := range batchFlags(formats) {
		switch f.Names()[0] {
		case "format", "output", "report", "plots":
			flags = append(flags, f)
		}
	}
	flags = append(flags, &cli.BoolFlag{Name: "strict", Usage: "treat warnings as failures (exit 1)"})
	flags = append(flags, queueFlags(true)...)
	return &cli.Command{
		Name:      "results",
		Usage:     "collect the results of a batch submitted with 'kweigh check --nats … --detach'",
		ArgsUsage: "BATCH",
		Description: "Waits until every file of the batch is judged and prints the results exactly as 'kweigh check'\n" +
			"would have, in any of its formats. Results are kept in the queue for 7 days and can be\n" +
			"collected as often as needed. --report and --plots need the batch to have been submitted with\n" +
			"--report or --plots (only then do workers send the loudness series).\n\n" +
			"A pass is not a broadcaster's or regulator's acceptance; local regulation and the receiving\n" +
			"party's own QC decide.\n\n" +
			fmt.Sprintf(exitsHelpFmt, "every file passed (warnings allowed unless --strict)", "at least one file failed its spec (or warned, with --strict)"),
		Flags: flags,
		Action: func(ctx context.Context, cmd *cli.Command) error {
			dial, _, err := readDial(cmd, "results")
			if err != nil {
				return err
			}
			if cmd.Args().Len() != 1 {
				return usagef("name one batch id (printed by 'kweigh check --nats URL --detach')")
			}
			f, err := reports.ParseFormat(cmd.String("format"))
			if err != nil {
				return usageError{err}
			}
			o := checkOptions{strict: cmd.Bool("strict")}
			o.format, o.output, o.report, o.plots, o.jobs = f, cmd.String("output"), cmd.String("report"), cmd.String("plots"), 1
			o.colour = isTerminal(cmd.Root().Writer) && os.Getenv("NO_COLOR") == ""
			return runResults(ctx, o, dial, cmd.Args().First(), cmd.Root().Writer, cmd.Root().ErrWriter)
		},
	}
}

// runResults collects a batch and reports it as check does.
func runResults(ctx context.Context, o checkOptions, dial queue.Dial, batch string, stdout, stderr io.Writer) error {
	if !queue.ValidBatch(batch) {
		return usagef("%q is not a batch id (one word of letters, digits, '-' and '_')", batch)
	}
	q, err := queue.Connect(ctx, dial)
	if err != nil {
		return err
	}
	defer q.Close()
	m, err := q.LoadManifest(ctx, batch)
	if err != nil {
		return usageError{err}
	}
	if (o.report != "" || o.plots != "") && !m.KeepSeries {
		fmt.Fprintf(stderr, "kweigh: batch %s was submitted without --report or --plots: the report has no loudness plots\n", batch)
	}
	targets := make([]engine.Target, len(m.Names))
	for i, n := range m.Names {
		targets[i] = engine.Target{Path: n, Root: n, Explicit: true}
	}
	if m.Spec != "" {
		// Only its id is shown (as the run's spec); each record carries
		// the spec it was judged by.
		o.spec = &rules.Spec{ID: m.Spec}
	}
	return reportCheck(ctx, o, targets, []string{"batch " + batch}, stdout, stderr, func(write func(int, engine.Record)) (int, error) {
		unfinished, err := collectBatch(ctx, q, batch, targets, !o.format.Streaming(), stderr, write)
		if ctx.Err() != nil && unfinished > 0 {
			fmt.Fprintf(stderr, "kweigh: batch %s goes on in the queue: run kweigh results again to collect it\n", batch)
		}
		return unfinished, err
	})
}
