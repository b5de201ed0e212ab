package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// target is one file to measure, in the order the output lists it.
type target struct {
	path string
	// root is the command-line argument the file was found under; folder
	// specs are looked for between the file and its root.
	root string
	// explicit is true when the user named the file itself (not found by
	// walking a folder): a non-audio file is then an error, not a skip.
	explicit bool
	// walkErr is set when the file could not even be listed.
	walkErr error
}

// folderSpecName is the file that gives a folder (and the folders below it)
// its own delivery spec.
const folderSpecName = "kweigh.toml"

// collect expands the command-line paths (files, folders walked recursively,
// glob patterns) into targets. Within a folder files are sorted by name so
// output order is stable. A path that does not exist is returned as an
// error: that is a usage mistake, not a bad delivery.
func collect(args []string) ([]target, error) {
	var out []target
	seen := map[string]bool{}
	add := func(t target) {
		if seen[t.path] {
			return
		}
		seen[t.path] = true
		out = append(out, t)
	}
	for _, arg := range args {
		paths := []string{arg}
		if strings.ContainsAny(arg, "*?[") {
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
					return nil, fmt.Errorf("%s: no such file or folder", p)
				}
				add(target{path: p, root: p, explicit: true, walkErr: err})
				continue
			}
			if !st.IsDir() {
				add(target{path: p, root: filepath.Dir(p), explicit: true})
				continue
			}
			walk(p, add)
		}
	}
	return out, nil
}

// walk lists the files under root, recursively, in filepath.WalkDir's
// lexical order (stable from run to run). Hidden
// entries (name starting with ".") and folder spec files are passed over.
// A folder that cannot be read becomes an error target so that the problem
// is reported with the other files instead of stopping the run.
func walk(root string, add func(target)) {
	var files []target
	filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			files = append(files, target{path: path, root: root, walkErr: err})
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
		if d.IsDir() || name == folderSpecName || !d.Type().IsRegular() && d.Type()&fs.ModeSymlink == 0 {
			return nil
		}
		files = append(files, target{path: path, root: root})
		return nil
	})
	for _, f := range files {
		add(f)
	}
}

// isNotAudio reports whether err means the file is simply not audio (to be
// skipped when it was found by walking a folder).
func isNotAudio(err error) bool {
	return errors.Is(err, decode.ErrUnknownFormat)
}
