package serve

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// TestUploadPageInBrowser drives the upload page in a real headless
// Chromium at a phone's width: the page loads nothing from elsewhere and
// fits the screen; choosing a file and pressing Check shows the verdict
// and the HTML report inline; a file that is not audio shows the server's
// reason.
func TestUploadPageInBrowser(t *testing.T) {
	bin := audiotest.Chromium(t)
	ts := startServer(t, Config{})
	dir := t.TempDir()
	wav := warnTone.file(t, dir, "tidewater-ep7.wav")
	text := filepath.Join(dir, "running-order.txt")
	os.WriteFile(text, notAudio, 0o600)

	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(bin), chromedp.NoSandbox, chromedp.DisableGPU,
		chromedp.UserDataDir(t.TempDir()), chromedp.WindowSize(390, 844))
	actx, cancelAlloc := chromedp.NewExecAllocator(ctx, opts...)
	defer cancelAlloc()
	bctx, cancelBrowser := chromedp.NewContext(actx)
	defer cancelBrowser()

	step := func(what string, err error) {
		t.Helper()
		if err != nil {
			t.Fatalf("browser: %s: %v", what, err)
		}
	}
	eval := func(what, js string) string {
		t.Helper()
		v, err := chromedp.Run(bctx, chromedp.Evaluate[string](js))
		step(what, err)
		return v
	}
	poll := func(what, js string) string {
		t.Helper()
		v, err := chromedp.Run(bctx, chromedp.Poll[string](js, chromedp.WithPollingTimeout(30*time.Second)))
		step(what, err)
		return v
	}
	step("open the page", chromedp.Do(bctx,
		chromedp.EmulateViewport(390, 844, chromedp.EmulateMobile),
		chromedp.Navigate(ts.url+"/"),
		chromedp.WaitVisible(chromedp.ID("send")),
	))
	fits := eval("width", `String(document.documentElement.scrollWidth <= window.innerWidth)`)
	external := eval("resources", `performance.getEntriesByType("resource").map(e => e.name).filter(n => !n.startsWith(location.origin)).join(" ")`)
	viewport := eval("viewport", `(document.querySelector('meta[name=viewport]') || {}).content || ""`)
	step("choose and send a file", chromedp.Do(bctx,
		chromedp.SetUploadFiles(chromedp.ID("file"), []string{wav}),
		chromedp.SetValue(chromedp.ID("spec"), "ebu-r128"),
		chromedp.Click(chromedp.ID("send")),
		chromedp.WaitVisible(chromedp.ID("result")),
	))
	verdict := eval("verdict", `document.getElementById("verdict").textContent`)
	verdictAttr := eval("verdict attribute", `document.getElementById("verdict").dataset.verdict || ""`)
	report := poll("inline report", `(() => { const d = document.getElementById("report").contentDocument;
		return d && d.readyState === "complete" && d.body && d.body.innerText.includes("tidewater-ep7.wav") ? d.body.innerText : false; })()`)
	if out := os.Getenv("KWEIGH_BROWSER_OUT"); out != "" {
		// KWEIGH_BROWSER_OUT=DIR keeps a screenshot of the answer for a look.
		png, err := chromedp.Run(bctx, chromedp.FullScreenshot(100))
		step("screenshot", err)
		os.WriteFile(filepath.Join(out, "upload-page.png"), png, 0o644)
	}
	step("send a file that is not audio", chromedp.Do(bctx,
		chromedp.SetUploadFiles(chromedp.ID("file"), []string{text}),
		chromedp.Click(chromedp.ID("send")),
	))
	status := poll("refusal", `(() => { const s = document.getElementById("status").textContent; return s.startsWith("Not checked") ? s : false; })()`)
	if fits != "true" {
		t.Errorf("the page is wider than a 390 px phone screen")
	}
	if external != "" {
		t.Errorf("the page loaded resources from elsewhere: %s", external)
	}
	if !strings.Contains(viewport, "width=device-width") {
		t.Errorf("viewport meta %q", viewport)
	}
	// warnTone reads -22.1 LUFS: inside ebu-r128's ±1 LU but within the
	// 0.2 LU warning margin.
	if verdictAttr != "warn" || !strings.Contains(verdict, "WARN") || !strings.Contains(verdict, "tidewater-ep7.wav") {
		t.Errorf("verdict shown %q (data-verdict %q), want WARN for tidewater-ep7.wav", verdict, verdictAttr)
	}
	if !strings.Contains(report, "-22.1") || !strings.Contains(report, "LUFS") {
		t.Errorf("the inline report does not show the integrated loudness -22.1 LUFS:\n%.600s", report)
	}
	if !strings.Contains(status, "not a recognised audio file") {
		t.Errorf("not-audio upload: status %q", status)
	}
}
