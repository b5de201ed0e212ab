package watch

import (
	"bufio"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestSignalStopsCleanly: without --once the real binary runs until SIGTERM
// (or SIGINT) and then exits 0.
func TestSignalStopsCleanly(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the binary")
	}
	bin := kweighBinary(t)
	for _, sig := range []syscall.Signal{syscall.SIGTERM, syscall.SIGINT} {
		t.Run(sig.String(), func(t *testing.T) {
			inbox := t.TempDir()
			writeWAV(t, filepath.Join(inbox, "ep1.wav"), 1, passDBFS)
			cmd := exec.Command(bin, "watch", "--settle", "100ms", "--spec", "ebu-r128", inbox)
			stdout, _ := cmd.StdoutPipe()
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			got := make(chan string, 1)
			go func() {
				sc := bufio.NewScanner(stdout)
				if sc.Scan() {
					got <- sc.Text()
				}
				for sc.Scan() {
				}
			}()
			select {
			case line := <-got:
				if !strings.Contains(line, `"placed_at"`) {
					t.Errorf("line %q", line)
				}
			case <-time.After(20 * time.Second):
				cmd.Process.Kill()
				t.Fatal("no line within 20 s")
			}
			cmd.Process.Signal(sig)
			done := make(chan error, 1)
			go func() { done <- cmd.Wait() }()
			select {
			case err := <-done:
				if err != nil {
					t.Errorf("after %v: %v, want exit 0", sig, err)
				}
			case <-time.After(10 * time.Second):
				cmd.Process.Kill()
				t.Fatalf("still running 10 s after %v", sig)
			}
		})
	}
}

// TestAbandonedRedone: a judgement still running when the watcher is
// stopped is abandoned, not recorded, and the next start judges the file
// again and places it once.
func TestAbandonedRedone(t *testing.T) {
	inbox, passed := t.TempDir(), filepath.Join(t.TempDir(), "passed")
	writeWAV(t, filepath.Join(inbox, "long-take.wav"), 1, passDBFS)
	judge := testJudge(t)
	started := make(chan struct{}, 1)
	// The real judge, reached only once the stop has been asked for: the
	// state a slow file is in when the watcher is stopped mid-judgement.
	slow := func(ctx context.Context, path, root string) (Judgement, error) {
		started <- struct{}{}
		<-ctx.Done()
		return judge(ctx, path, root)
	}
	o := Options{Inboxes: []string{inbox}, Passed: passed, Settle: 100 * time.Millisecond, Judge: slow}
	w := start(t, o)
	select {
	case <-started:
	case <-time.After(10 * time.Second):
		t.Fatal("never judged")
	}
	if sum := w.stop(t); sum.Files != 0 {
		t.Fatalf("abandoned run counted %d files", sum.Files)
	}
	rows := ledgerRows(t, filepath.Join(inbox, ".kweigh"))
	if len(rows) != 1 || rows[0].State != StateJudging {
		t.Fatalf("after the stop: %+v", rows)
	}
	if _, err := os.Stat(filepath.Join(inbox, "long-take.wav")); err != nil {
		t.Fatalf("the abandoned file moved: %v", err)
	}
	o.Judge, o.Once = judge, true
	sum, err := Run(context.Background(), o)
	if err != nil || sum.Files != 1 || sum.Passed != 1 {
		t.Fatalf("restart: %+v, %v", sum, err)
	}
	rows = ledgerRows(t, filepath.Join(inbox, ".kweigh"))
	if len(rows) != 1 || rows[0].State != StatePlaced || rows[0].Dest != filepath.Join(passed, "long-take.wav") {
		t.Fatalf("after the restart: %+v", rows)
	}
}
