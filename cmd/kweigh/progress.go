package main

import (
	"io"
	"os"

	"github.com/vbauerster/mpb/v8"
	"github.com/vbauerster/mpb/v8/decor"
	"golang.org/x/term"
)

// progress shows a bar on stderr while files are measured, but only when
// stderr is a terminal: in a pipeline or a log file it writes nothing.
type progress struct {
	p   *mpb.Progress
	bar *mpb.Bar
}

// isTerminal reports whether w is a terminal (for the progress bar and for
// colour).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

func newProgress(stderr io.Writer, total int) *progress {
	if total < 2 || !isTerminal(stderr) {
		return &progress{}
	}
	p := mpb.New(mpb.WithOutput(stderr), mpb.WithWidth(40))
	bar := p.AddBar(int64(total),
		mpb.PrependDecorators(decor.Name("weighing "), decor.CountersNoUnit("%d/%d")),
		mpb.AppendDecorators(decor.Percentage()),
		mpb.BarRemoveOnComplete(),
	)
	return &progress{p: p, bar: bar}
}

func (p *progress) step() {
	if p.bar != nil {
		p.bar.Increment()
	}
}

func (p *progress) done() {
	if p.p != nil {
		p.bar.Abort(true)
		p.p.Wait()
	}
}
