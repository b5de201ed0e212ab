package engine

import (
	"context"
	"runtime"
	"sync"
)

// Run calls work for every target on up to jobs goroutines (jobs < 1 means
// one per CPU) and hands each record to emit, together with the target's
// index. With ordered, records are emitted in target order, each as soon
// as every earlier one is in (output stays stable yet progressive);
// otherwise in the order they finish. emit is never called concurrently and
// Run returns when every record started has been emitted.
//
// When ctx is cancelled no new target starts; work already running gets the
// same ctx and should return early (Judge does, within one block of audio).
// Targets never started are not emitted: compare the count emitted with
// len(targets) to see whether the run was complete.
func Run(ctx context.Context, targets []Target, jobs int, work func(context.Context, Target) Record, emit func(i int, r Record), ordered bool) {
	RunEach(ctx, len(targets), jobs, func(ctx context.Context, i int) Record { return work(ctx, targets[i]) }, emit, ordered)
}

// RunEach is Run for any kind of work: it calls work for i = 0 … n-1 on up
// to jobs goroutines and hands each result to emit, with the same ordering,
// cancellation and completeness rules as Run. Front ends whose unit of work
// is not a judgement (fix: correct a file and judge the output) share the
// pool through it.
func RunEach[T any](ctx context.Context, n, jobs int, work func(ctx context.Context, i int) T, emit func(i int, r T), ordered bool) {
	if jobs < 1 {
		jobs = runtime.NumCPU()
	}
	jobs = min(jobs, max(n, 1))
	type finished struct {
		i int
		r T
	}
	next := make(chan int)
	out := make(chan finished)
	var wg sync.WaitGroup
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				out <- finished{i, work(ctx, i)}
			}
		}()
	}
	go func() {
		defer close(next)
		for i := 0; i < n; i++ {
			// Checked before offering the index too: select picks at
			// random among ready cases.
			if ctx.Err() != nil {
				return
			}
			select {
			case next <- i:
			case <-ctx.Done():
				return
			}
		}
	}()
	go func() {
		wg.Wait()
		close(out)
	}()
	pending := map[int]T{}
	k := 0
	for f := range out {
		if !ordered {
			emit(f.i, f.r)
			continue
		}
		// Indexes are handed out in order, so every index below the
		// highest started one is started too and arrives eventually.
		pending[f.i] = f.r
		for {
			r, ok := pending[k]
			if !ok {
				break
			}
			delete(pending, k)
			emit(k, r)
			k++
		}
	}
}
