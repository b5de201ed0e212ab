package queue

import (
	"context"
	"fmt"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/rules"
)

// SpecRefOf is how a spec already loaded travels with a job: a built-in by
// its id, a spec read from a file by that file's text.
func SpecRefOf(s *rules.Spec) (SpecRef, error) {
	if s.File == "" {
		return SpecRef{Builtin: s.ID}, nil
	}
	return NamedSpec(s.File)
}

// JudgeOne is engine.JudgeTarget through the queue, for front ends that
// judge one file at a time (the hot folder, the upload gate): the file's
// audio is uploaded, one job is queued as a batch of its own, and the call
// waits for a worker's result. The record is the one a local judgement
// would give, its Target set to t. An error is about the queue (not
// reachable, ctx ended), never about the file: the file's own problems are
// in the record.
func (q *Queue) JudgeOne(ctx context.Context, t engine.Target, opt SubmitOptions) (engine.Record, error) {
	batch := NewBatch()
	if _, err := q.Submit(ctx, batch, []engine.Target{t}, opt); err != nil {
		return engine.Record{}, fmt.Errorf("%s: queueing: %w", t.Path, err)
	}
	var rec engine.Record
	if err := q.Wait(ctx, batch, 1, func(r Result) { rec = r.Record }); err != nil {
		return engine.Record{}, fmt.Errorf("%s: waiting for a worker: %w", t.Path, err)
	}
	rec.Target = t
	return rec, nil
}
