package main

import (
	"os"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// progress shows a bar on stderr for work that runs longer than a second,
// only when stderr is a terminal. Its update method is a plan.Progress.
type progress struct {
	what    string
	enabled bool
	start   time.Time
	bar     *progressbar.ProgressBar
}

func newProgress(g *globals, what string) *progress {
	f, ok := g.stderr.(*os.File)
	return &progress{what: what, enabled: ok && term.IsTerminal(int(f.Fd())), start: time.Now()}
}

func (p *progress) update(done, total int) {
	if !p.enabled {
		return
	}
	if p.bar == nil {
		if time.Since(p.start) < time.Second || done >= total {
			return
		}
		p.bar = progressbar.NewOptions(total,
			progressbar.OptionSetWriter(os.Stderr),
			progressbar.OptionSetDescription(p.what),
			progressbar.OptionShowCount(),
			progressbar.OptionSetPredictTime(true),
			progressbar.OptionThrottle(100*time.Millisecond),
			progressbar.OptionClearOnFinish(),
		)
	}
	_ = p.bar.Set(done)
}

func (p *progress) done() {
	if p.bar != nil {
		_ = p.bar.Finish()
	}
}
