package engine

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sync"

	"github.com/kweigh/kweigh/rules"
)

// MaxSpecFileBytes caps what is read of a spec file (rules.MaxSpecBytes,
// the one limit rules.ReadSpecFile applies).
const MaxSpecFileBytes = rules.MaxSpecBytes

// NoSpecError is a file for which neither the options nor any kweigh.toml
// from its folder upwards give a spec.
type NoSpecError struct{ Path string }

func (e *NoSpecError) Error() string {
	return fmt.Sprintf("%s: no spec: give --spec NAME, or put a %s in its folder or a folder above it", e.Path, rules.SpecFileName)
}

// FindSpec returns the spec that governs the file at path and the spec
// file it came from: the nearest kweigh.toml, searching from the file's
// folder upwards to the filesystem root. A kweigh.toml with "root = true"
// ends the search at its folder (one that says only that is a boundary: the
// file then has no folder spec). With no spec the error is a *NoSpecError; a
// spec file that cannot be read or parsed is an error naming it.
func FindSpec(path string) (*rules.Spec, string, error) {
	return findSpec(path, loadFolderSpec)
}

// folderSpec is one kweigh.toml as loaded: a spec, a root-only boundary, or
// an error. A zero value means there is no such file.
type folderSpec struct {
	spec     *rules.Spec
	boundary bool
	err      error
}

func (f folderSpec) found() bool { return f.spec != nil || f.boundary || f.err != nil }

func findSpec(path string, load func(string) folderSpec) (*rules.Spec, string, error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return nil, "", fmt.Errorf("%s: %w", path, err)
	}
	dir := filepath.Dir(abs)
	for {
		file := filepath.Join(dir, rules.SpecFileName)
		if f := load(file); f.found() {
			switch {
			case f.err != nil:
				return nil, file, f.err
			case f.boundary:
				return nil, "", &NoSpecError{Path: path}
			}
			return f.spec, file, nil
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return nil, "", &NoSpecError{Path: path}
		}
		dir = parent
	}
}

// loadFolderSpec loads one candidate kweigh.toml. A missing file is not
// found; anything else that is not a regular file is an error at once, so a
// FIFO in place of a spec never blocks the run.
func loadFolderSpec(path string) folderSpec {
	st, err := os.Stat(path)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return folderSpec{}
		}
		return folderSpec{err: fmt.Errorf("spec %w", err)}
	}
	if st.IsDir() {
		return folderSpec{}
	}
	data, err := rules.ReadSpecFile(path)
	if err != nil {
		return folderSpec{err: err}
	}
	if rules.IsRootMarker(data) {
		return folderSpec{boundary: true}
	}
	s, err := rules.Parse(path, data)
	if err != nil {
		return folderSpec{err: err}
	}
	return folderSpec{spec: s}
}

// LoadSpec resolves a spec named by a user: a built-in id, or else a TOML
// spec file (regular files only, so a FIFO never blocks).
func LoadSpec(name string) (*rules.Spec, error) {
	s, lookupErr := rules.Lookup(name)
	if lookupErr == nil {
		return s, nil
	}
	if _, err := os.Stat(name); err != nil {
		return nil, lookupErr
	}
	data, err := rules.ReadSpecFile(name)
	if err != nil {
		return nil, err
	}
	if rules.IsRootMarker(data) {
		return nil, fmt.Errorf("%s: sets only root = true (a folder boundary), no limits to judge by", name)
	}
	return rules.Parse(name, data)
}

// Specs resolves folder specs for a batch, reading and parsing each
// kweigh.toml once. It is safe for concurrent use; a broken spec file is
// reported for each file it governs. The cache never forgets: a long-running
// front end (a watcher) makes a new one for each scan so that edited spec
// files take effect.
type Specs struct {
	mu    sync.Mutex
	cache map[string]folderSpec
}

// NewSpecs returns an empty cache.
func NewSpecs() *Specs { return &Specs{cache: map[string]folderSpec{}} }

// Find is FindSpec with the cache.
func (c *Specs) Find(path string) (*rules.Spec, string, error) {
	return findSpec(path, c.load)
}

func (c *Specs) load(path string) folderSpec {
	c.mu.Lock()
	defer c.mu.Unlock()
	if f, ok := c.cache[path]; ok {
		return f
	}
	f := loadFolderSpec(path)
	c.cache[path] = f
	return f
}
