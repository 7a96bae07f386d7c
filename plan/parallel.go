package plan

import (
	"context"
	"runtime"
	"sync"
	"sync/atomic"
	"time"
)

// progressEvery is how often a parallel run reports progress.
const progressEvery = 100 * time.Millisecond

// runParallel calls fn(g, i) for every i in [0, n) on GOMAXPROCS goroutines
// (at most n). Each goroutine owns one Geometry, reused for every call it
// makes, so a profile is extracted into storage that is already there. fn
// must write its results by index (never append), which keeps the output
// the same whatever the number of cores and the order of the calls.
//
// progress, when not nil, is called from the calling goroutine only: about
// every 100 ms with the number of finished calls, and once with (n, n) at
// the end of a successful run. The run stops early when ctx is cancelled
// (returning ctx's error) or when fn fails; of the errors seen, the one of
// the lowest index is returned.
func runParallel(ctx context.Context, n int, progress Progress, fn func(g *Geometry, i int) error) error {
	return parallelWith(ctx, n, progress, fn)
}

// parallelWith is runParallel with worker storage of any type W: each
// goroutine owns one zero W, reused for every call it makes (a Geometry for
// the profile jobs, the coverage engine's sample buffers for its radials).
func parallelWith[W any](ctx context.Context, n int, progress func(done, total int), fn func(w *W, i int) error) error {
	if n == 0 {
		if progress != nil {
			progress(0, 0)
		}
		return ctx.Err()
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	workers := min(runtime.GOMAXPROCS(0), n)
	var (
		next, done atomic.Int64
		mu         sync.Mutex
		firstErr   error
		errAt      = n
		wg         sync.WaitGroup
	)
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var w W
			for ctx.Err() == nil {
				i := int(next.Add(1) - 1)
				if i >= n {
					return
				}
				if err := fn(&w, i); err != nil {
					mu.Lock()
					if i < errAt {
						errAt, firstErr = i, err
					}
					mu.Unlock()
					cancel()
					return
				}
				done.Add(1)
			}
		}()
	}
	finished := make(chan struct{})
	go func() { wg.Wait(); close(finished) }()
	if progress != nil {
		tick := time.NewTicker(progressEvery)
	wait:
		for {
			select {
			case <-finished:
				break wait
			case <-tick.C:
				progress(int(done.Load()), n)
			}
		}
		tick.Stop()
	} else {
		<-finished
	}
	if firstErr != nil {
		return firstErr
	}
	if int(done.Load()) < n {
		return context.Cause(ctx)
	}
	if progress != nil {
		progress(n, n)
	}
	return nil
}
