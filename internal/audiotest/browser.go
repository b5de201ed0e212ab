package audiotest

import (
	"os"
	"os/exec"
	"testing"
)

// Chromium finds Debian's chromium for the real-browser tests (the HTML
// report, the upload page). The test fails without it: CI must run them
// (.ci/setup installs chromium). KWEIGH_SKIP_BROWSER=1 skips them on a
// developer machine that cannot have a browser, but never in CI: where the
// CI variable is set the request is refused.
func Chromium(t testing.TB) string {
	t.Helper()
	if os.Getenv("KWEIGH_SKIP_BROWSER") == "1" {
		if ci := os.Getenv("CI"); ci != "" && ci != "false" && ci != "0" {
			t.Fatal("KWEIGH_SKIP_BROWSER=1 is not honoured in CI (CI is set): the real-browser test must run there")
		}
		t.Skip("KWEIGH_SKIP_BROWSER=1: real-browser test skipped on request")
	}
	for _, name := range []string{"chromium", "/usr/bin/chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	t.Fatal("chromium not found: install it (Debian: apt-get install chromium; .ci/setup does this) or set KWEIGH_SKIP_BROWSER=1 to skip the real-browser test")
	return ""
}
