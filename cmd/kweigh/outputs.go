package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"

	"github.com/kweigh/kweigh/engine"
)

// runFiles are a run's output files, set up before any input is opened so
// that a mistake in them costs nothing: an output that names an input file
// is refused, and one that cannot be created fails at once rather than after
// the whole batch has been measured.
type runFiles struct {
	output *pendingFile // --output, nil without it
	report *pendingFile // --report, nil without it
	plots  string       // --plots folder, made and known writable
	// markers is the --markers CSV, nil without it.
	markers *pendingFile
}

// prepareOutputs checks the output options against the targets and
// creates the pending output files.
func prepareOutputs(o batchOptions, targets []engine.Target) (*runFiles, error) {
	named := []struct{ flag, path string }{{"--output", o.output}, {"--report", o.report}, {"--markers", o.qc.markers}}
	for i, a := range named {
		if a.path == "" {
			continue
		}
		if err := notAnInput(a.flag, a.path, targets); err != nil {
			return nil, err
		}
		for _, b := range named[i+1:] {
			if b.path != "" && samePath(a.path, b.path) {
				return nil, usagef("%s and %s name the same file %s", a.flag, b.flag, a.path)
			}
		}
	}
	files := &runFiles{}
	var err error
	if o.output != "" {
		if files.output, err = createPending(o.output); err != nil {
			return nil, usagef("--output: %v", err)
		}
	}
	if o.report != "" {
		if files.report, err = createPending(o.report); err != nil {
			files.abort()
			return nil, usagef("--report: %v", err)
		}
	}
	if o.qc.markers != "" {
		if files.markers, err = createPending(o.qc.markers); err != nil {
			files.abort()
			return nil, usagef("--markers: %v", err)
		}
	}
	if o.plots != "" {
		if err := writableDir(o.plots); err != nil {
			files.abort()
			return nil, usagef("--plots: %v", err)
		}
		files.plots = o.plots
	}
	return files, nil
}

// abort removes the pending files that were not committed.
func (f *runFiles) abort() {
	f.output.abort()
	f.report.abort()
	f.markers.abort()
}

// notAnInput refuses an output path that is one of the input files (the
// same file by device and inode, whatever the names): writing it would
// destroy the delivery being checked.
func notAnInput(flag, path string, targets []engine.Target) error {
	out, err := os.Stat(path)
	if err != nil {
		return nil // not there yet: cannot be an input
	}
	for _, t := range targets {
		in, err := os.Stat(t.Path)
		if err == nil && os.SameFile(in, out) {
			return usagef("%s %s is the input file %s: refusing to overwrite it", flag, path, t.Path)
		}
	}
	return nil
}

func samePath(a, b string) bool {
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	if errA == nil && errB == nil {
		return os.SameFile(sa, sb)
	}
	return a == b
}

// writableDir makes dir (and its parents) and proves that a file can be
// created in it.
func writableDir(dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	probe, err := createPending(dir + string(os.PathSeparator) + "probe")
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			return fmt.Errorf("cannot create files in %s: %w", dir, pe.Err)
		}
		return err
	}
	probe.abort()
	return nil
}
