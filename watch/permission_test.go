package watch

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// TestPermissionDenied: a file the watcher may not read is judged an error
// (and moved to failed, which needs no read permission), a folder it may
// not list is logged, and the rest of the inbox is judged as usual. Root
// reads everything, so as root the real binary runs as the unprivileged
// user nobody.
func TestPermissionDenied(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the binary")
	}
	bin := kweighBinary(t)
	root := t.TempDir()
	inbox, failed, passed := filepath.Join(root, "inbox"), filepath.Join(root, "failed"), filepath.Join(root, "passed")
	writeWAV(t, filepath.Join(inbox, "ep1.wav"), 1, passDBFS)
	writeWAV(t, filepath.Join(inbox, "locked.wav"), 1, passDBFS)
	writeWAV(t, filepath.Join(inbox, "sealed", "ep9.wav"), 1, passDBFS)
	cmd := exec.Command(bin, "watch", "--once", "--settle", "50ms", "--spec", "ebu-r128", "--passed", passed, "--failed", failed, inbox)
	if os.Geteuid() == 0 {
		// Everything the user nobody must reach is opened up to it, except
		// the two things under test.
		for _, d := range []string{filepath.Dir(root), root, inbox} {
			os.Chmod(d, 0o777)
		}
		for _, d := range []string{failed, passed} {
			os.Mkdir(d, 0o777)
			os.Chmod(d, 0o777)
		}
		os.Chmod(filepath.Join(inbox, "ep1.wav"), 0o644)
		cmd.SysProcAttr = &syscall.SysProcAttr{Credential: &syscall.Credential{Uid: 65534, Gid: 65534}}
	}
	os.Chmod(filepath.Join(inbox, "locked.wav"), 0)
	os.Chmod(filepath.Join(inbox, "sealed"), 0)
	t.Cleanup(func() { os.Chmod(filepath.Join(inbox, "sealed"), 0o755) })
	out, err := cmd.CombinedOutput()
	if code := cmd.ProcessState.ExitCode(); code != 2 {
		t.Fatalf("exit %d (%v), want 2 (a file could not be judged)\n%s", code, err, out)
	}
	text := string(out)
	if !strings.Contains(text, "cannot read folder") || !strings.Contains(text, "sealed") {
		t.Errorf("the unlistable folder was not logged:\n%s", text)
	}
	if _, err := os.Stat(filepath.Join(passed, "ep1.wav")); err != nil {
		t.Errorf("the readable file was not judged and placed: %v", err)
	}
	if _, err := os.Lstat(filepath.Join(failed, "locked.wav")); err != nil {
		t.Errorf("the unreadable file is not in failed: %v", err)
	}
	var locked map[string]any
	for _, line := range strings.Split(text, "\n") {
		if strings.HasPrefix(line, "{") && strings.Contains(line, "locked.wav") {
			locked = map[string]any{"line": line}
		}
	}
	if locked == nil || !strings.Contains(locked["line"].(string), "permission denied") || !strings.Contains(locked["line"].(string), `"verdict":"error"`) {
		t.Errorf("the unreadable file's record: %v", locked)
	}
}
