package main

import (
	"bufio"
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// TestPendingFileKeepsPreviousOnError: a write error (here a real one: the
// descriptor is closed under the writer) or an abort leaves the previous
// file as it was and no temporary file behind; a commit replaces it whole.
func TestPendingFileKeepsPreviousOnError(t *testing.T) {
	dir := t.TempDir()
	final := filepath.Join(dir, "qc.html")
	os.WriteFile(final, []byte("previous good report"), 0o644)
	leftovers := func() []string {
		m, _ := filepath.Glob(filepath.Join(dir, ".*.part"))
		return m
	}

	p, err := createPending(final)
	if err != nil {
		t.Fatal(err)
	}
	p.File.Close() // every write from now on fails in the kernel
	err = writePending(p, func(w *bufio.Writer) error {
		_, err := w.WriteString(string(make([]byte, 1<<16))) // larger than the buffer: reaches the file
		return err
	})
	if err == nil || !errors.Is(err, os.ErrClosed) {
		t.Errorf("write to a closed file: %v, want the error", err)
	}
	if got, _ := os.ReadFile(final); string(got) != "previous good report" || len(leftovers()) > 0 {
		t.Errorf("after a write error: %q, leftovers %v", got, leftovers())
	}

	p, _ = createPending(final)
	p.WriteString("half a report")
	p.abort()
	if got, _ := os.ReadFile(final); string(got) != "previous good report" || len(leftovers()) > 0 {
		t.Errorf("after abort: %q, leftovers %v", got, leftovers())
	}

	p, _ = createPending(final)
	if err := writePending(p, func(w *bufio.Writer) error { _, err := w.WriteString("new report"); return err }); err != nil {
		t.Fatal(err)
	}
	st, _ := os.Stat(final)
	if got, _ := os.ReadFile(final); string(got) != "new report" || st.Mode().Perm() != 0o644 || len(leftovers()) > 0 {
		t.Errorf("after commit: %q, mode %v, leftovers %v", got, st.Mode().Perm(), leftovers())
	}
}
