package engine_test

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"github.com/kweigh/kweigh/engine"
)

// TestCollect: folders in lexical order without hidden entries or spec
// files, FIFOs listed (to be refused when opened), existing names taken
// literally, patterns only for names that do not exist, duplicates once.
func TestCollect(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"b.wav", "a.wav", "sub/c.flac", ".hidden.wav", ".cache/d.wav", "kweigh.toml", "ep[1].wav", "ep1.wav"} {
		writeFile(t, dir, name, nil)
	}
	if err := syscall.Mkfifo(filepath.Join(dir, "sub", "pipe.wav"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(filepath.Join(dir, "gone.wav"), filepath.Join(dir, "dangling.wav")); err != nil {
		t.Fatal(err)
	}
	rel := func(ts []engine.Target) []string {
		var out []string
		for _, tg := range ts {
			r, _ := filepath.Rel(dir, tg.Path)
			if tg.Err != nil {
				r += "!"
			}
			out = append(out, filepath.ToSlash(r))
		}
		return out
	}
	got, err := engine.Collect([]string{dir, filepath.Join(dir, "a.wav")})
	if err != nil {
		t.Fatal(err)
	}
	want := "a.wav b.wav dangling.wav ep1.wav ep[1].wav sub/c.flac sub/pipe.wav"
	if strings.Join(rel(got), " ") != want {
		t.Errorf("folder: %v, want %s", rel(got), want)
	}
	got, _ = engine.Collect([]string{filepath.Join(dir, "ep[1].wav"), filepath.Join(dir, "dangling.wav"), filepath.Join(dir, "ep[0-9].wav")})
	if strings.Join(rel(got), " ") != "ep[1].wav dangling.wav! ep1.wav" || !got[0].Explicit {
		t.Errorf("names: %v, want ep[1].wav literally, the dangling link as an error, the pattern's match", rel(got))
	}
	if _, err := engine.Collect([]string{filepath.Join(dir, "nothing.wav")}); !errors.Is(err, engine.ErrNoSuchPath) {
		t.Errorf("missing name: %v", err)
	}
	if _, err := engine.Collect([]string{filepath.Join(dir, "*.mp3")}); err == nil || !strings.Contains(err.Error(), "matches no files") {
		t.Errorf("empty pattern: %v", err)
	}
}
