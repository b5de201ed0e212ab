package engine

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"github.com/kweigh/kweigh/rules"
)

// Target is one file to judge, in the order the output lists it.
type Target struct {
	// Path is the file as named or found.
	Path string
	// Root is the argument the file was found under (the file itself when
	// it was named).
	Root string
	// Explicit is true when the file was named itself rather than found by
	// walking a folder: a file that is not audio is then an error, not a
	// skip.
	Explicit bool
	// Err is set when the file could not even be listed; judging the target
	// reports it as the file's error.
	Err error
}

// ErrNoSuchPath is returned (wrapped with the argument) by Collect for a
// name that does not exist and is not a pattern that matches something.
var ErrNoSuchPath = errors.New("no such file or folder")

// Collect expands arguments into targets: a name that exists is taken
// literally (so "ep[1].wav" is that file), folders are walked recursively in
// lexical order, skipping hidden entries and kweigh.toml files; only a name
// that does not exist is tried as a glob pattern. A file found twice is
// listed once. A name that neither exists nor matches is an error: that is a
// mistake in the request, not a bad delivery.
func Collect(args []string) ([]Target, error) {
	var out []Target
	seen := map[string]bool{}
	add := func(t Target) {
		if seen[t.Path] {
			return
		}
		seen[t.Path] = true
		out = append(out, t)
	}
	for _, arg := range args {
		paths := []string{arg}
		if _, err := os.Lstat(arg); errors.Is(err, fs.ErrNotExist) && strings.ContainsAny(arg, "*?[") {
			matches, err := filepath.Glob(arg)
			if err != nil {
				return nil, fmt.Errorf("pattern %q: %w", arg, err)
			}
			if len(matches) == 0 {
				return nil, fmt.Errorf("pattern %q matches no files", arg)
			}
			paths = matches
		}
		for _, p := range paths {
			st, err := os.Stat(p)
			if err != nil {
				if errors.Is(err, fs.ErrNotExist) {
					if _, lerr := os.Lstat(p); lerr == nil {
						// A dangling symbolic link: the delivery is broken.
						add(Target{Path: p, Root: p, Explicit: true, Err: err})
						continue
					}
					return nil, fmt.Errorf("%s: %w", p, ErrNoSuchPath)
				}
				add(Target{Path: p, Root: p, Explicit: true, Err: err})
				continue
			}
			if !st.IsDir() {
				add(Target{Path: p, Root: p, Explicit: true})
				continue
			}
			walk(p, add)
		}
	}
	return out, nil
}

// walk lists the files under root, recursively, in filepath.WalkDir's
// lexical order (stable from run to run). Hidden entries (name starting with
// ".") and folder spec files are passed over. Everything else is a target,
// FIFOs and devices included: opening them reports "not a regular file" at
// once instead of blocking. A folder that cannot be read becomes an error
// target so that the problem is reported with the other files instead of
// stopping the run.
func walk(root string, add func(Target)) {
	var files []Target
	filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			files = append(files, Target{Path: path, Root: root, Err: err})
			if d != nil && d.IsDir() {
				return fs.SkipDir
			}
			return nil
		}
		name := d.Name()
		if path != root && strings.HasPrefix(name, ".") {
			if d.IsDir() {
				return fs.SkipDir
			}
			return nil
		}
		if d.IsDir() || name == rules.SpecFileName {
			return nil
		}
		files = append(files, Target{Path: path, Root: root})
		return nil
	})
	for _, f := range files {
		add(f)
	}
}
