package queue

import (
	"context"
	"crypto/rand"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"time"

	"github.com/nats-io/nats.go/jetstream"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// NewBatch returns a new batch id: the UTC time and 48 random bits, so ids
// sort by submission and never collide in practice.
func NewBatch() string {
	var b [6]byte
	rand.Read(b[:])
	return time.Now().UTC().Format("20060102T150405") + "-" + hex.EncodeToString(b[:])
}

// ValidBatch reports whether s has the form of a batch id (one subject
// token of letters, digits, '-' and '_').
func ValidBatch(s string) bool { return validBatch(s) }

// Upload puts the audio of the open file f (named path) in the object
// store under its SHA-256 unless an object of that name is already there
// and young enough (put less than half the bucket's lifetime ago: an older
// one is sent again, so it does not expire under the job).
// It returns the object name, the size, and whether it was sent.
func (q *Queue) Upload(ctx context.Context, path string, f *os.File) (object string, size int64, sent bool, err error) {
	h := sha256.New()
	size, err = io.Copy(h, f)
	if err != nil {
		return "", 0, false, fmt.Errorf("%s: %w", path, err)
	}
	object = ObjectName(hex.EncodeToString(h.Sum(nil)))
	err = retry(ctx, func(ctx context.Context) error {
		store, err := q.audioStore(ctx)
		if err != nil {
			return err
		}
		info, err := store.GetInfo(ctx, object)
		if err == nil && info.Size == uint64(size) && !info.Deleted && time.Since(info.ModTime) < q.audioMaxAge/2 {
			sent = false
			return nil
		}
		if err != nil && !errors.Is(err, jetstream.ErrObjectNotFound) {
			return err
		}
		if _, err := f.Seek(0, io.SeekStart); err != nil {
			return err
		}
		// Uploads are not bounded by the 5 s of one retry attempt.
		if _, err := store.Put(context.WithoutCancel(ctx), jetstream.ObjectMeta{Name: object}, f); err != nil {
			return err
		}
		sent = true
		return nil
	})
	if err != nil {
		return "", 0, false, fmt.Errorf("%s: upload to %s: %w", path, q.names.AudioBucket(), err)
	}
	return object, size, sent, nil
}

// Publish puts a job in the queue. Publishing the same job again (same
// batch and index) within the de-duplication window stores it once.
func (q *Queue) Publish(ctx context.Context, j Job) error {
	data, err := json.Marshal(j)
	if err != nil {
		return fmt.Errorf("%s: job: %w", j.Name, err)
	}
	err = retry(ctx, func(ctx context.Context) error {
		_, err := q.js.Publish(ctx, q.names.JobSubject(j.Batch), data, jetstream.WithMsgID(msgID(j.Batch, j.Index)))
		return err
	})
	if err != nil {
		return fmt.Errorf("%s: job not queued: %w", j.Name, err)
	}
	return nil
}

// PublishRecord puts a result the submitter made itself (a file that
// needs no worker: no spec for it, or it could not even be read) in the
// results, so that collecting the batch later finds it too.
func (q *Queue) PublishRecord(ctx context.Context, batch string, index int, rec engine.Record, spec SpecRef) error {
	o, err := newOutcome(batch, index, rec.Result, rec.Skipped, spec)
	if err != nil {
		return err
	}
	data, err := encodeOutcome(o)
	if err != nil {
		return err
	}
	return retry(ctx, func(ctx context.Context) error {
		_, err := q.js.Publish(ctx, q.names.ResultSubject(batch), data, jetstream.WithMsgID(msgID(batch, index)))
		return err
	})
}

// Manifest describes a batch, for collecting its results later.
type Manifest struct {
	// Batch is the id; Names the files in their output order.
	Batch string   `json:"batch"`
	Names []string `json:"names"`
	// Spec is the spec given for every file ("" for folder specs), as
	// reports show it.
	Spec string `json:"spec,omitempty"`
	// KeepSeries says whether the jobs asked for loudness series (needed
	// by HTML reports and plots).
	KeepSeries bool      `json:"keep_series,omitempty"`
	Created    time.Time `json:"created"`
}

// SaveManifest stores a batch's manifest.
func (q *Queue) SaveManifest(ctx context.Context, m Manifest) error {
	data, err := json.Marshal(m)
	if err != nil {
		return err
	}
	err = retry(ctx, func(ctx context.Context) error {
		kv, err := q.js.KeyValue(ctx, q.names.BatchBucket())
		if err != nil {
			return err
		}
		_, err = kv.Put(ctx, m.Batch, data)
		return err
	})
	if err != nil {
		return fmt.Errorf("batch %s: manifest not stored: %w", m.Batch, err)
	}
	return nil
}

// ErrNoBatch is returned (wrapped with the id) for a batch the queue does
// not know, or no longer keeps.
var ErrNoBatch = errors.New("no such batch")

// LoadManifest reads a batch's manifest.
func (q *Queue) LoadManifest(ctx context.Context, batch string) (Manifest, error) {
	var m Manifest
	if !validBatch(batch) {
		return m, fmt.Errorf("batch %q: %w (ids are one word of letters, digits, '-' and '_')", batch, ErrNoBatch)
	}
	var entry jetstream.KeyValueEntry
	err := retry(ctx, func(ctx context.Context) error {
		kv, err := q.js.KeyValue(ctx, q.names.BatchBucket())
		if err != nil {
			return err
		}
		entry, err = kv.Get(ctx, batch)
		return err
	})
	if errors.Is(err, jetstream.ErrKeyNotFound) {
		return m, fmt.Errorf("batch %s: %w in %s (results are kept %v)", batch, ErrNoBatch, q.names.BatchBucket(), resultMaxAge)
	}
	if err != nil {
		return m, fmt.Errorf("batch %s: %w", batch, err)
	}
	if err := json.Unmarshal(entry.Value(), &m); err != nil {
		return m, fmt.Errorf("batch %s: manifest: %w", batch, err)
	}
	return m, nil
}

// Result is one collected result.
type Result struct {
	// Index is the job's place in the batch.
	Index int
	// Record is the judgement as engine would have returned it locally:
	// Measurement, Result, Spec and Skipped are set (Target is left for
	// the caller, who knows the target list).
	Record engine.Record
	// Worker and Deliveries say who judged it after how many deliveries.
	Worker     string
	Deliveries int
}

// Wait collects the results of batch, jobs 0 to n-1, handing each job's
// first result to emit (never concurrently) as it arrives; a second result
// for a job (a redelivery that was judged twice) is ignored. It returns
// when all n are in, or with ctx's error when ctx ends first. Results are
// read from the start of the batch, so Wait may be called long after the
// jobs were judged.
func (q *Queue) Wait(ctx context.Context, batch string, n int, emit func(Result)) error {
	if n == 0 {
		return nil
	}
	var it jetstream.MessagesContext
	err := retry(ctx, func(ctx context.Context) error {
		cons, err := q.js.OrderedConsumer(ctx, q.names.ResultStream(), jetstream.OrderedConsumerConfig{
			FilterSubjects: []string{q.names.ResultSubject(batch)},
			DeliverPolicy:  jetstream.DeliverAllPolicy,
		})
		if err != nil {
			return err
		}
		it, err = cons.Messages()
		return err
	})
	if err != nil {
		return fmt.Errorf("results of batch %s: %w", batch, err)
	}
	stop := context.AfterFunc(ctx, it.Stop)
	defer stop()
	defer it.Stop()
	seen := make([]bool, n)
	got := 0
	specs := map[SpecRef]*rules.Spec{}
	for got < n {
		msg, err := it.Next()
		if err != nil {
			if ctx.Err() != nil {
				return ctx.Err()
			}
			if errors.Is(err, jetstream.ErrMsgIteratorClosed) {
				return fmt.Errorf("results of batch %s: %w", batch, err)
			}
			// Missed heartbeats while the server restarts: the ordered
			// consumer recreates itself.
			time.Sleep(100 * time.Millisecond)
			continue
		}
		o, _, err := decodeOutcome(msg.Data())
		if err != nil || o.Batch != batch || o.Index < 0 || o.Index >= n || seen[o.Index] {
			continue
		}
		seen[o.Index] = true
		got++
		spec, ok := specs[o.Spec]
		if !ok {
			spec, _ = o.Spec.Resolve()
			specs[o.Spec] = spec
		}
		rec := engine.Record{Result: o.Result, Spec: spec, Skipped: o.Skipped}
		if o.Result != nil {
			rec.Measurement = o.Result.Measurement
		} else {
			rec.Measurement = &measure.Measurement{Notes: []string{}}
		}
		emit(Result{Index: o.Index, Worker: o.Worker, Deliveries: o.Deliveries, Record: rec})
	}
	return nil
}

// OpenAudio opens a file for Upload the way kweigh opens audio: regular
// files only, without blocking on a FIFO.
func OpenAudio(path string) (*os.File, error) { return decode.OpenRegular(path) }

// SubmitOptions say how a batch's files are to be judged.
type SubmitOptions struct {
	// Spec judges every file, and SpecRef is how it travels (its built-in
	// id or its TOML text); with Spec nil each file's folder spec is found
	// with Specs (which must then be set) and its text travels.
	Spec    *rules.Spec
	SpecRef SpecRef
	Specs   *engine.Specs
	// Measure options carried by every job.
	Layout     []string
	KeepSeries bool
	SkipMD5    bool
}

// Submitted counts what a submission did.
type Submitted struct {
	// Jobs were queued for workers; Local records were made by the
	// submitter itself (no spec, a broken spec, an unreadable file) and
	// put straight into the results.
	Jobs, Local int
	// Sent uploads; Present files whose audio was already in the store.
	Sent, Present int
}

// Submit uploads the targets' audio and queues one job per target, in
// order, with message ids batch.index; a target that needs no worker gets
// its record from engine at once, as a local check would, and that record
// goes into the results. Errors are about the queue, never about a file.
func (q *Queue) Submit(ctx context.Context, batch string, targets []engine.Target, opt SubmitOptions) (Submitted, error) {
	var s Submitted
	texts := map[string]string{}
	local := func(i int, t engine.Target) error {
		eo := engine.Options{Spec: opt.Spec, Specs: opt.Specs}
		eo.Measure.Layout, eo.Measure.KeepSeries, eo.Measure.Decode.SkipMD5 = opt.Layout, opt.KeepSeries, opt.SkipMD5
		s.Local++
		return q.PublishRecord(ctx, batch, i, engine.JudgeTarget(ctx, t, eo), SpecRef{})
	}
	for i, t := range targets {
		if err := ctx.Err(); err != nil {
			return s, err
		}
		ref := opt.SpecRef
		if t.Err != nil {
			if err := local(i, t); err != nil {
				return s, err
			}
			continue
		}
		if opt.Spec == nil {
			_, file, err := opt.Specs.Find(t.Path)
			if err == nil {
				text, ok := texts[file]
				if !ok {
					text, err = readSpecText(file)
					texts[file] = text
				}
				ref = SpecRef{File: file, TOML: text}
			}
			if err != nil {
				if err := local(i, t); err != nil {
					return s, err
				}
				continue
			}
		}
		f, err := OpenAudio(t.Path)
		if err != nil {
			if err := local(i, t); err != nil {
				return s, err
			}
			continue
		}
		object, size, sent, err := q.Upload(ctx, t.Path, f)
		f.Close()
		if err != nil {
			return s, err
		}
		if sent {
			s.Sent++
		} else {
			s.Present++
		}
		j := Job{Batch: batch, Index: i, Name: t.Path, Object: object, Size: size, Explicit: t.Explicit, Spec: ref,
			Layout: opt.Layout, KeepSeries: opt.KeepSeries, SkipMD5: opt.SkipMD5}
		if err := q.Publish(ctx, j); err != nil {
			return s, err
		}
		s.Jobs++
	}
	return s, nil
}

// readSpecText reads a spec file's text as engine does (rules.ReadSpecFile).
func readSpecText(path string) (string, error) {
	data, err := rules.ReadSpecFile(path)
	return string(data), err
}
