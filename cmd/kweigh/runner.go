package main

import (
	"context"
	"runtime"
	"sync"
)

// runParallel calls work for every index in [0, n) on up to jobs goroutines
// and hands each result to done in the order the work finishes (done is
// never called concurrently). It returns the results in index order, so
// document-style output stays stable however the work is scheduled. When
// ctx is cancelled no new work starts; work already running finishes.
func runParallel[T any](ctx context.Context, n, jobs int, work func(i int) T, done func(i int, r T)) []T {
	if jobs <= 0 {
		jobs = runtime.NumCPU()
	}
	jobs = min(jobs, max(n, 1))
	results := make([]T, n)
	next := make(chan int)
	type finished struct {
		i int
		r T
	}
	out := make(chan finished)
	var wg sync.WaitGroup
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				out <- finished{i, work(i)}
			}
		}()
	}
	go func() {
		defer close(next)
		for i := 0; i < n; i++ {
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
	for f := range out {
		results[f.i] = f.r
		if done != nil {
			done(f.i, f.r)
		}
	}
	return results
}
