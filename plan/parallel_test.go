package plan

import (
	"context"
	"errors"
	"fmt"
	"testing"
)

// TestRunParallel checks the engine's contract: every index once, results
// by index, the lowest-index error, the final progress call, cancellation.
func TestRunParallel(t *testing.T) {
	const n = 1000
	seen := make([]int, n)
	var last [2]int
	calls := 0
	err := runParallel(context.Background(), n, func(done, total int) { last = [2]int{done, total}; calls++ }, func(g *Geometry, i int) error {
		seen[i]++
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range seen {
		if c != 1 {
			t.Fatalf("index %d run %d times", i, c)
		}
	}
	if last != [2]int{n, n} || calls == 0 {
		t.Errorf("last progress %v after %d calls, want (%d, %d)", last, calls, n, n)
	}
	err = runParallel(context.Background(), n, nil, func(g *Geometry, i int) error {
		if i == 3 || i == 700 {
			return fmt.Errorf("job %d failed", i)
		}
		return nil
	})
	// Jobs are taken in index order and a taken job always runs, so job 3
	// has run by the time job 700 fails.
	if err == nil || err.Error() != "job 3 failed" {
		t.Errorf("error %v, want job 3's", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := runParallel(ctx, n, nil, func(g *Geometry, i int) error { return nil }); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled run returned %v", err)
	}
	if err := runParallel(context.Background(), 0, nil, nil); err != nil {
		t.Errorf("empty run: %v", err)
	}
}
