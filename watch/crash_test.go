package watch

import (
	"bufio"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"
)

var (
	binaryOnce sync.Once
	binaryPath string
	binaryErr  error
)

// kweighBinary builds the real command once per test run.
func kweighBinary(t *testing.T) string {
	t.Helper()
	binaryOnce.Do(func() {
		dir, err := os.MkdirTemp("", "kweigh-watch-bin")
		if err != nil {
			binaryErr = err
			return
		}
		os.Chmod(dir, 0o755) // TestPermissionDenied runs it as another user
		binaryPath = filepath.Join(dir, "kweigh")
		cmd := exec.Command(filepath.Join(runtime.GOROOT(), "bin", "go"), "build", "-o", binaryPath, "github.com/kweigh/kweigh/cmd/kweigh")
		if out, err := cmd.CombinedOutput(); err != nil {
			binaryErr = fmt.Errorf("go build: %v\n%s", err, out)
		}
	})
	if binaryErr != nil {
		t.Fatal(binaryErr)
	}
	return binaryPath
}

// crashBatch is the delivery the crash tests use: three passing and three
// failing files in two folders.
var crashBatch = map[string]float64{
	"a/ep1.wav": passDBFS, "a/ep2.wav": failDBFS, "a/ep3.wav": passDBFS,
	"b/promo1.wav": failDBFS, "b/promo2.wav": passDBFS, "b/promo3.wav": failDBFS,
}

// TestCrashSafety kills the real binary with SIGKILL at named steps (the
// test-support pause, PauseEnv, holds it there), restarts it with --once,
// and checks that every file was placed exactly once, with one report pair
// and one ledger row, and nothing is left in the inbox.
func TestCrashSafety(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the binary")
	}
	bin := kweighBinary(t)
	shm := "/dev/shm"
	crossFS := sameDevice(t.TempDir(), shm) == false
	cases := []struct {
		name, pause string
		crossFS     bool
	}{
		{"during judging", "judging:3", false},
		{"between judging and moving", "judged:2", false},
		{"before a move", "moving:4", false},
		{"after a move, before it is recorded", "moved:2", false},
		{"across file systems, between judging and moving", "judged:3", true},
		{"across file systems, copied but source not removed", "copied:2", true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.crossFS && !crossFS {
				t.Skip("/dev/shm is not a separate file system here")
			}
			root := t.TempDir()
			outRoot := root
			if c.crossFS {
				d, err := os.MkdirTemp(shm, "kweigh-crash")
				if err != nil {
					t.Fatal(err)
				}
				t.Cleanup(func() { os.RemoveAll(d) })
				outRoot = d
			}
			inbox := filepath.Join(root, "inbox")
			passed, failed := filepath.Join(outRoot, "passed"), filepath.Join(outRoot, "failed")
			sums := map[string]string{}
			for rel, db := range crashBatch {
				p := filepath.Join(inbox, rel)
				writeWAV(t, p, 1, db)
				sum, err := fingerprint(p)
				if err != nil {
					t.Fatal(err)
				}
				sums[rel] = sum
			}
			args := []string{"watch", "--once", "--settle", "100ms", "--jobs", "2", "--spec", "ebu-r128",
				"--passed", passed, "--failed", failed, inbox}

			// First run: held at the step, then killed.
			cmd := exec.Command(bin, args...)
			cmd.Env = append(os.Environ(), PauseEnv+"="+c.pause)
			stderr, err := cmd.StderrPipe()
			if err != nil {
				t.Fatal(err)
			}
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			paused := make(chan string, 1)
			go func() {
				sc := bufio.NewScanner(stderr)
				for sc.Scan() {
					if strings.Contains(sc.Text(), "test pause at") {
						paused <- sc.Text()
					}
				}
				close(paused)
			}()
			select {
			case line, ok := <-paused:
				if !ok {
					cmd.Wait()
					t.Fatalf("the binary ended without reaching %s", c.pause)
				}
				t.Logf("killing at: %s", line)
			case <-time.After(30 * time.Second):
				cmd.Process.Kill()
				t.Fatalf("the binary did not reach %s within 30 s", c.pause)
			}
			if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
				t.Fatal(err)
			}
			err = cmd.Wait()
			var exit *exec.ExitError
			if !errors.As(err, &exit) || exit.Sys().(syscall.WaitStatus).Signal() != syscall.SIGKILL {
				t.Fatalf("first run: %v, want killed by SIGKILL", err)
			}

			// Restart: finishes the work.
			again := exec.Command(bin, args...)
			out, err := again.CombinedOutput()
			if again.ProcessState == nil || again.ProcessState.ExitCode() == 2 || again.ProcessState.ExitCode() < 0 {
				t.Fatalf("restart: %v\n%s", err, out)
			}

			// Every file placed exactly once, in the right folder, intact.
			placed := map[string]string{}
			for _, dir := range []string{passed, failed} {
				for _, f := range filesUnder(t, dir) {
					placed[f] = dir
				}
			}
			if len(placed) != len(crashBatch) {
				t.Errorf("placed files: %v, want exactly the %d delivered", keys(placed), len(crashBatch))
			}
			for rel, db := range crashBatch {
				want := passed
				if db == failDBFS {
					want = failed
				}
				if placed[rel] != want {
					t.Errorf("%s placed in %q, want %s", rel, placed[rel], want)
					continue
				}
				if sum, _ := fingerprint(filepath.Join(want, rel)); sum != sums[rel] {
					t.Errorf("%s: placed content differs from the delivery", rel)
				}
			}
			// Nothing left in the inbox but the state folder.
			for _, f := range filesUnder(t, inbox) {
				if !strings.HasPrefix(f, ".kweigh/") {
					t.Errorf("left in the inbox: %s", f)
				}
			}
			// One report pair per file, and nothing else.
			reports := filesUnder(t, filepath.Join(inbox, ".kweigh", "reports"))
			slices.Sort(reports)
			var wantReports []string
			for rel := range crashBatch {
				wantReports = append(wantReports, rel+".html", rel+".json")
			}
			slices.Sort(wantReports)
			if !slices.Equal(reports, wantReports) {
				t.Errorf("reports: %v, want %v", reports, wantReports)
			}
			// One ledger row per file, placed where the file is.
			rows := ledgerRows(t, filepath.Join(inbox, ".kweigh"))
			if len(rows) != len(crashBatch) {
				t.Errorf("%d ledger rows, want %d", len(rows), len(crashBatch))
			}
			for _, e := range rows {
				if e.State != StatePlaced || e.Dest != filepath.Join(placed[e.Rel], e.Rel) || e.Fingerprint != sums[e.Rel] {
					t.Errorf("ledger row %s: state %s, dest %s, fingerprint %.8s…", e.Rel, e.State, e.Dest, e.Fingerprint)
				}
			}
		})
	}
}

func sameDevice(a, b string) bool {
	var sa, sb syscall.Stat_t
	if syscall.Stat(a, &sa) != nil || syscall.Stat(b, &sb) != nil {
		return true
	}
	return sa.Dev == sb.Dev
}

// TestMain removes the binary the tests built.
func TestMain(m *testing.M) {
	code := m.Run()
	if binaryPath != "" {
		os.RemoveAll(filepath.Dir(binaryPath))
	}
	os.Exit(code)
}
