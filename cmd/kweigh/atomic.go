package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"github.com/kweigh/kweigh/internal/leftovers"
)

// pendingFile is an output written under a temporary name in the folder of
// its final name and renamed into place only when complete (after an
// fsync), so that an interrupted run, a full disk or a write error leaves
// any previous file of that name as it was. The temporary name is hidden
// (it starts with a dot), so folder walkers and watchers pass it over.
type pendingFile struct {
	*os.File
	final string
	done  bool
}

// createPending creates the temporary file for final at once, so that an
// output that cannot be created fails before any work starts.
func createPending(final string) (*pendingFile, error) {
	dir, base := filepath.Split(final)
	if dir == "" {
		dir = "."
	}
	// Named after this process, so that a later run removes what a killed
	// one left (package leftovers).
	f, err := leftovers.CreateHidden(dir, base, ".part")
	if err != nil {
		return nil, err
	}
	return &pendingFile{File: f, final: final}, nil
}

// commit makes the file durable and renames it into place.
func (p *pendingFile) commit() error {
	if p.done {
		return errors.New("output already finished")
	}
	p.done = true
	err := p.Sync()
	if cerr := p.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		// CreateTemp makes the file private; an output is an ordinary file.
		err = os.Chmod(p.Name(), 0o644)
	}
	if err == nil {
		err = os.Rename(p.Name(), p.final)
	}
	if err != nil {
		os.Remove(p.Name())
		return fmt.Errorf("%s: %w", p.final, err)
	}
	return nil
}

// abort removes the temporary file, leaving the final name untouched. It
// is safe to call after commit (it then does nothing).
func (p *pendingFile) abort() {
	if p == nil || p.done {
		return
	}
	p.done = true
	p.Close()
	os.Remove(p.Name())
}
