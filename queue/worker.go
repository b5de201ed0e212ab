package queue

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"github.com/nats-io/nats.go/jetstream"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/leftovers"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// Config says how a worker runs.
type Config struct {
	// Jobs is how many jobs the worker judges at once (at least 1).
	Jobs int
	// AckWait is how long JetStream waits for an acknowledgement or a
	// heartbeat before it hands the job to another worker. It is set on
	// the shared consumer, so all workers should use the same. Default 30 s.
	AckWait time.Duration
	// MaxDeliveries is how often a job may be delivered before the worker
	// that receives it once more ends it with an error result instead of
	// judging it (a file that kills or hangs every worker). Default 5.
	MaxDeliveries int
	// Drain is how long running jobs may go on after the worker is asked
	// to stop; then they are stopped and handed back (nak) for another
	// worker. Default 10 s.
	Drain time.Duration
	// Name is the worker's name in results and logs; default host:pid.
	Name string
	// TempDir holds fetched audio while it is judged (os.TempDir when
	// empty).
	TempDir string
	// Log receives one line per job and per problem; nil discards them.
	Log io.Writer

	// Test support: BeforeJudge, when set, is called with each job just
	// before it is judged (to make a worker stall or crash on a named file
	// in tests); NoHeartbeat stops the worker from sending in-progress
	// heartbeats. Neither is for production use.
	BeforeJudge func(ctx context.Context, j Job)
	NoHeartbeat bool
}

func (c Config) withDefaults() Config {
	if c.Jobs < 1 {
		c.Jobs = 1
	}
	if c.AckWait <= 0 {
		c.AckWait = 30 * time.Second
	}
	if c.MaxDeliveries < 1 {
		c.MaxDeliveries = 5
	}
	if c.Drain <= 0 {
		c.Drain = 10 * time.Second
	}
	if c.Name == "" {
		host, _ := os.Hostname()
		c.Name = fmt.Sprintf("%s:%d", host, os.Getpid())
	}
	if c.TempDir == "" {
		c.TempDir = os.TempDir()
	}
	if c.Log == nil {
		c.Log = io.Discard
	}
	return c
}

// Work pulls and judges jobs until ctx is cancelled, then lets running jobs
// finish for at most cfg.Drain and hands back (nak) those still running.
// It returns nil after such a stop; an error only when it cannot start.
func (q *Queue) Work(ctx context.Context, cfg Config) error {
	cfg = cfg.withDefaults()
	// Job files of a worker that was killed mid-job (package leftovers).
	leftovers.Sweep(cmp.Or(cfg.TempDir, os.TempDir()), "kweigh-job-", "")
	var cons jetstream.Consumer
	if err := retry(ctx, func(ctx context.Context) error {
		var err error
		cons, err = q.consumer(ctx, cfg.AckWait)
		return err
	}); err != nil {
		if ctx.Err() != nil {
			return nil
		}
		return fmt.Errorf("job consumer %s on %s: %w", q.names.Consumer(), q.names.JobStream(), err)
	}
	// Jobs run on a context that outlives ctx by the drain time.
	jobCtx, stopJobs := context.WithCancel(context.WithoutCancel(ctx))
	defer stopJobs()
	go func() {
		<-ctx.Done()
		select {
		case <-time.After(cfg.Drain):
			stopJobs()
		case <-jobCtx.Done():
		}
	}()
	var logMu sync.Mutex
	logf := func(format string, a ...any) {
		logMu.Lock()
		defer logMu.Unlock()
		fmt.Fprintf(cfg.Log, "kweigh worker %s: %s\n", cfg.Name, fmt.Sprintf(format, a...))
	}
	var wg sync.WaitGroup
	for i := 0; i < cfg.Jobs; i++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for ctx.Err() == nil {
				batch, err := cons.Fetch(1, jetstream.FetchMaxWait(time.Second))
				if err != nil {
					if ctx.Err() == nil {
						logf("fetching jobs: %v", err)
						time.Sleep(250 * time.Millisecond)
					}
					continue
				}
				for msg := range batch.Messages() {
					q.handle(ctx, jobCtx, cfg, msg, logf)
				}
				if err := batch.Error(); err != nil && ctx.Err() == nil && !errors.Is(err, jetstream.ErrNoMessages) && !errors.Is(err, context.DeadlineExceeded) {
					logf("fetching jobs: %v", err)
					time.Sleep(250 * time.Millisecond)
				}
			}
		}()
	}
	wg.Wait()
	return nil
}

// handle judges one job message and publishes its result before acking.
func (q *Queue) handle(ctx, jobCtx context.Context, cfg Config, msg jetstream.Msg, logf func(string, ...any)) {
	meta, err := msg.Metadata()
	if err != nil {
		logf("message without metadata: %v", err)
		msg.Term()
		return
	}
	job, err := decodeJob(msg.Data())
	if err != nil {
		// Nothing to report it under: end it so it does not loop.
		logf("%s, sequence %d: %v; dropped", msg.Subject(), meta.Sequence.Stream, err)
		msg.TermWithReason(err.Error())
		return
	}
	deliveries := int(meta.NumDelivered)
	if deliveries > cfg.MaxDeliveries {
		err := fmt.Errorf("given up after %d deliveries: every worker that took it stopped before finishing (a crash, a hang or a lost connection), so it is not judged", deliveries-1)
		rec := failed(job, err)
		logf("%s: %v", job.Name, err)
		q.finish(jobCtx, cfg, msg, job, rec.Result, false, deliveries, logf)
		return
	}
	logf("%s: judging (delivery %d)", job.Name, deliveries)
	// Heartbeats keep the job while it runs.
	stopBeat := make(chan struct{})
	beatDone := make(chan struct{})
	go func() {
		defer close(beatDone)
		if cfg.NoHeartbeat {
			<-stopBeat
			return
		}
		t := time.NewTicker(max(cfg.AckWait/3, 50*time.Millisecond))
		defer t.Stop()
		for {
			select {
			case <-stopBeat:
				return
			case <-t.C:
				msg.InProgress()
			}
		}
	}()
	rec := q.judge(jobCtx, cfg, job)
	close(stopBeat)
	<-beatDone
	if rec.Interrupted() {
		logf("%s: stopped (the worker is shutting down); handed back", job.Name)
		msg.Nak()
		return
	}
	q.finish(jobCtx, cfg, msg, job, rec.Result, rec.Skipped, deliveries, logf)
}

// finish publishes the result (retrying through a server restart) and then
// acks the job. A result that cannot be published leaves the job unacked,
// so JetStream redelivers it.
func (q *Queue) finish(ctx context.Context, cfg Config, msg jetstream.Msg, job Job, r *rules.Result, skipped bool, deliveries int, logf func(string, ...any)) {
	o, err := newOutcome(job.Batch, job.Index, r, skipped, job.Spec)
	if err == nil {
		o.Worker, o.Deliveries = cfg.Name, deliveries
		var data []byte
		if data, err = encodeOutcome(o); err != nil {
			o, _ = newOutcome(job.Batch, job.Index, failed(job, err).Result, false, job.Spec)
			o.Worker, o.Deliveries = cfg.Name, deliveries
			data, err = encodeOutcome(o)
		}
		if err == nil {
			err = retry(ctx, func(ctx context.Context) error {
				_, err := q.js.Publish(ctx, q.names.ResultSubject(job.Batch), data, jetstream.WithMsgID(msgID(job.Batch, job.Index)))
				return err
			})
		}
	}
	if err != nil {
		logf("%s: result not published: %v; the job will be delivered again", job.Name, err)
		msg.Nak()
		return
	}
	if err := retry(ctx, func(ctx context.Context) error { return msg.DoubleAck(ctx) }); err != nil {
		// The result is in; a redelivery would publish it again under
		// the same message id, which is stored once.
		logf("%s: ack not confirmed: %v", job.Name, err)
	}
	if skipped {
		logf("%s: not audio, skipped", job.Name)
	} else {
		logf("%s: %s", job.Name, r.Verdict)
	}
}

// judge fetches the job's audio and judges it; every problem ends up in the
// record.
func (q *Queue) judge(ctx context.Context, cfg Config, job Job) engine.Record {
	spec, err := job.Spec.Resolve()
	if err != nil {
		return failed(job, err)
	}
	store, err := q.audioStore(ctx)
	if err != nil {
		return failed(job, fmt.Errorf("audio bucket %s: %w", q.names.AudioBucket(), err))
	}
	tmp, err := os.CreateTemp(cfg.TempDir, leftovers.Pattern("kweigh-job-", strings.ToLower(filepath.Ext(job.Name))))
	if err != nil {
		return failed(job, fmt.Errorf("worker %s: temporary file: %w", cfg.Name, err))
	}
	defer os.Remove(tmp.Name())
	defer tmp.Close()
	obj, err := store.Get(ctx, job.Object)
	if errors.Is(err, jetstream.ErrObjectNotFound) {
		return failed(job, fmt.Errorf("audio object %s is no longer in %s (uploads are kept %v; submit the file again): %w",
			job.Object, q.names.AudioBucket(), q.audioMaxAge, err))
	}
	if err != nil {
		return failed(job, fmt.Errorf("audio object %s: %w", job.Object, err))
	}
	// The object store checks the SHA-256 digest at the end of the read.
	n, err := io.Copy(tmp, obj)
	obj.Close()
	if err == nil && n != job.Size {
		err = fmt.Errorf("%d bytes, the job says %d", n, job.Size)
	}
	if err != nil {
		return failed(job, fmt.Errorf("audio object %s: %w", job.Object, err))
	}
	if cfg.BeforeJudge != nil {
		cfg.BeforeJudge(ctx, job)
	}
	opt := engine.Options{Spec: spec, Measure: measure.Options{
		Layout:     job.Layout,
		KeepSeries: job.KeepSeries,
		Decode:     decode.Options{SkipMD5: job.SkipMD5},
	}}
	t := engine.Target{Path: job.Name, Root: job.Name, Explicit: job.Explicit}
	return engine.JudgeSource(ctx, t, tmp, opt)
}

// failed is the error record of a job that could not be judged.
func failed(job Job, err error) engine.Record {
	t := engine.Target{Path: job.Name, Root: job.Name, Explicit: true, Err: err}
	// A target carrying its error is judged without reading anything.
	return engine.JudgeTarget(context.Background(), t, engine.Options{Spec: &rules.Spec{ID: "none"}})
}
