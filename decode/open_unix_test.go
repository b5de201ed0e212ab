//go:build unix

package decode_test

import (
	"errors"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
)

// TestOpenRefusesNonRegular: a FIFO (which would block a plain open until
// a writer comes), a device and a folder are refused at once with
// ErrNotRegular; a symbolic link to a regular file is followed.
func TestOpenRefusesNonRegular(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "drop.wav")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skipf("mkfifo: %v", err)
	}
	for _, path := range []string{fifo, "/dev/zero", dir} {
		done := make(chan error, 1)
		go func() {
			_, err := decode.Open(path)
			done <- err
		}()
		select {
		case err := <-done:
			if !errors.Is(err, decode.ErrNotRegular) {
				t.Errorf("Open(%s) = %v, want ErrNotRegular", path, err)
			}
		case <-time.After(5 * time.Second):
			t.Fatalf("Open(%s) blocked", path)
		}
	}
	target := filepath.Join(dir, "real.wav")
	if err := os.WriteFile(target, tinyWAV(), 0o600); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.wav")
	if err := os.Symlink(target, link); err != nil {
		t.Fatal(err)
	}
	f, err := decode.Open(link)
	if err != nil {
		t.Fatalf("Open(symlink to a WAV) = %v", err)
	}
	f.Close()
}
