package watch

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestFullDisk: with the reports folder on a full file system the watcher
// logs the error, records it in the ledger and keeps going; once there is
// room again the file is judged and placed, once. The full file system is
// a real 512 KiB tmpfs, which needs root (CI runs as root); elsewhere the
// test is skipped.
func TestFullDisk(t *testing.T) {
	if os.Geteuid() != 0 {
		t.Skip("mounting a small tmpfs needs root")
	}
	reports := t.TempDir()
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", "size=512k", "tmpfs", reports).CombinedOutput(); err != nil {
		t.Skipf("cannot mount a tmpfs here: %v %s", err, out)
	}
	t.Cleanup(func() { exec.Command("umount", "-l", reports).Run() })
	filler := filepath.Join(reports, "filler")
	f, err := os.Create(filler)
	if err != nil {
		t.Fatal(err)
	}
	for {
		if _, err := f.Write(make([]byte, 64<<10)); err != nil {
			break // full
		}
	}
	f.Close()

	inbox, passed := t.TempDir(), filepath.Join(t.TempDir(), "passed")
	writeWAV(t, filepath.Join(inbox, "ep1.wav"), 1, passDBFS)
	var logs lines
	out := &lines{}
	w := start(t, Options{Inboxes: []string{inbox}, Passed: passed, Reports: reports, Settle: 100 * time.Millisecond,
		Poll: 150 * time.Millisecond, Judge: testJudge(t), Output: out, Log: newTextLogger(&logs)})
	state := filepath.Join(inbox, ".kweigh")
	waitFor(t, "the full disk recorded in the ledger", 10*time.Second, func() bool {
		l, err := OpenLedgerReader(state)
		if err != nil {
			return false // not made yet
		}
		defer l.Close()
		rows, err := l.Since(context.Background(), time.Time{})
		return err == nil && len(rows) == 1 && strings.Contains(rows[0].Error, "no space left")
	})
	if _, err := os.Stat(filepath.Join(inbox, "ep1.wav")); err != nil {
		t.Fatalf("the file left the inbox without its reports: %v", err)
	}
	logs.mu.Lock()
	logged := bytes.Contains(logs.buf.Bytes(), []byte("no space left"))
	logs.mu.Unlock()
	if !logged {
		t.Error("the full disk was not logged")
	}
	os.Remove(filler)
	waitFor(t, "placed once there is room", 10*time.Second, func() bool { return len(out.records(t)) == 1 })
	w.stop(t)
	rows := ledgerRows(t, state)
	if len(rows) != 1 || rows[0].State != StatePlaced || rows[0].Error != "" {
		t.Fatalf("ledger: %d rows, first %s %s %q", len(rows), rows[0].Rel, rows[0].State, rows[0].Error)
	}
	for _, ext := range []string{".json", ".html"} {
		if _, err := os.Stat(filepath.Join(reports, "ep1.wav"+ext)); err != nil {
			t.Error(err)
		}
	}
	if left := filesUnder(t, reports); len(left) != 2 {
		t.Errorf("reports folder holds %v", left)
	}
}
