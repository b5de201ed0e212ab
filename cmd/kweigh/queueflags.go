package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/queue"
)

// queueFlags are the options that reach a NATS server, shared by check,
// worker and results. required is set for the commands that only work
// through the queue.
func queueFlags(required bool) []cli.Flag {
	usage := "hand the work to the NATS JetStream queue at `URL` (nats://host:4222, tls://…; a comma-separated list for a cluster) instead of judging here"
	if required {
		usage = "the NATS JetStream server at `URL` (nats://host:4222, tls://…; a comma-separated list for a cluster)"
	}
	return []cli.Flag{
		&cli.StringFlag{Name: "nats", Usage: usage, Required: required},
		&cli.StringFlag{Name: "creds", Usage: "NATS credentials `FILE` (user JWT and NKey seed)"},
		&cli.StringFlag{Name: "tls-ca", Usage: "PEM `FILE` of the authorities that sign the NATS server's certificate (makes TLS required)"},
		&cli.StringFlag{Name: "tls-cert", Usage: "client certificate `FILE` for a NATS server that verifies clients (with --tls-key)"},
		&cli.StringFlag{Name: "tls-key", Usage: "client key `FILE` for --tls-cert"},
		&cli.StringFlag{Name: "queue-prefix", Value: queue.DefaultPrefix, Usage: "`PREFIX` of the queue's streams, buckets and subjects (letters, digits, - and _)"},
	}
}

// readDial reads the queue options; ok is false without --nats.
func readDial(cmd *cli.Command, role string) (d queue.Dial, ok bool, err error) {
	d = queue.Dial{
		URL: cmd.String("nats"), Creds: cmd.String("creds"),
		CA: cmd.String("tls-ca"), Cert: cmd.String("tls-cert"), Key: cmd.String("tls-key"),
		Prefix: cmd.String("queue-prefix"), Name: "kweigh " + role,
	}
	if d.URL == "" {
		for _, f := range []string{"creds", "tls-ca", "tls-cert", "tls-key"} {
			if cmd.String(f) != "" {
				return d, false, usagef("--%s needs --nats URL", f)
			}
		}
		return d, false, nil
	}
	if (d.Cert == "") != (d.Key == "") {
		return d, false, usagef("--tls-cert and --tls-key go together")
	}
	if _, err := queue.NewNames(d.Prefix); err != nil {
		return d, false, usageError{err}
	}
	return d, true, nil
}

// remoteOptions are check's queue options.
type remoteOptions struct {
	dial   queue.Dial
	detach bool
}

// runRemote is runBatch through the queue: it uploads the targets' audio,
// queues one job per file and collects the results as they come, handing
// them to write exactly as runBatch does.
func runRemote(ctx context.Context, co checkOptions, targets []engine.Target, opt engine.Options, stderr io.Writer, write func(int, engine.Record)) (int, error) {
	q, batch, err := submitBatch(ctx, co, targets, opt, stderr)
	if err != nil {
		return 0, err
	}
	defer q.Close()
	unfinished, err := collectBatch(ctx, q, batch, targets, !co.format.Streaming(), stderr, write)
	if ctx.Err() != nil && unfinished > 0 {
		fmt.Fprintf(stderr, "kweigh: batch %s goes on in the queue: kweigh results --nats %s %s collects it\n", batch, co.remote.dial.URL, batch)
	}
	return unfinished, err
}

// submitBatch connects, stores the batch's manifest and submits every
// target; it returns the open queue and the batch id.
func submitBatch(ctx context.Context, co checkOptions, targets []engine.Target, opt engine.Options, stderr io.Writer) (*queue.Queue, string, error) {
	q, err := queue.Connect(ctx, co.remote.dial)
	if err != nil {
		return nil, "", err
	}
	so := queue.SubmitOptions{Spec: co.spec, Specs: opt.Specs, Layout: co.layout, KeepSeries: opt.Measure.KeepSeries, SkipMD5: co.decode.SkipMD5}
	if co.spec != nil {
		if so.SpecRef, err = queue.NamedSpec(co.specName); err != nil {
			q.Close()
			return nil, "", err
		}
	}
	batch := queue.NewBatch()
	m := queue.Manifest{Batch: batch, KeepSeries: so.KeepSeries}
	if co.spec != nil {
		m.Spec = co.spec.ID
	}
	for _, t := range targets {
		m.Names = append(m.Names, t.Path)
	}
	if err := q.SaveManifest(ctx, m); err != nil {
		q.Close()
		return nil, "", err
	}
	sub, err := q.Submit(ctx, batch, targets, so)
	if err != nil {
		q.Close()
		return nil, "", fmt.Errorf("batch %s: %w", batch, err)
	}
	fmt.Fprintf(stderr, "kweigh: batch %s: %d job(s) queued (%d file(s) uploaded, %d already in the store)\n", batch, sub.Jobs, sub.Sent, sub.Present)
	return q, batch, nil
}

// collectBatch waits for a batch's results and hands them to write in
// target order (ordered) or as they come, leaving out files that are not
// audio (noted at the end), with a progress bar on a terminal. It returns
// how many targets have no result yet.
func collectBatch(ctx context.Context, q *queue.Queue, batch string, targets []engine.Target, ordered bool, stderr io.Writer, write func(int, engine.Record)) (int, error) {
	bar := newProgress(stderr, len(targets))
	pending := map[int]engine.Record{}
	next, done := 0, 0
	var skipped []string
	emit := func(i int, r engine.Record) {
		if r.Skipped {
			skipped = append(skipped, r.Target.Path)
			return
		}
		write(i, r)
	}
	err := q.Wait(ctx, batch, len(targets), func(res queue.Result) {
		bar.step()
		done++
		rec := res.Record
		rec.Target = targets[res.Index]
		if !ordered {
			emit(res.Index, rec)
			return
		}
		pending[res.Index] = rec
		for {
			r, ok := pending[next]
			if !ok {
				break
			}
			delete(pending, next)
			emit(next, r)
			next++
		}
	})
	bar.done()
	noteSkipped(stderr, skipped)
	if err != nil && ctx.Err() == nil {
		return len(targets) - done, err
	}
	return len(targets) - done, nil
}

// submitDetached submits a batch and prints its id on stdout.
func submitDetached(ctx context.Context, co checkOptions, targets []engine.Target, opt engine.Options, stdout, stderr io.Writer) error {
	q, batch, err := submitBatch(ctx, co, targets, opt, stderr)
	if err != nil {
		return err
	}
	q.Close()
	fmt.Fprintln(stdout, batch)
	fmt.Fprintf(stderr, "kweigh: collect the results with: kweigh results --nats %s%s %s\n", co.remote.dial.URL, prefixFlag(co.remote.dial.Prefix), batch)
	return nil
}

func prefixFlag(p string) string {
	if p == "" || strings.EqualFold(p, queue.DefaultPrefix) && p == queue.DefaultPrefix {
		return ""
	}
	return " --queue-prefix " + p
}
