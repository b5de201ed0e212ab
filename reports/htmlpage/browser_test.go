package htmlpage

import (
	"bytes"
	"context"
	"fmt"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"golang.org/x/net/html"
	"golang.org/x/net/html/atom"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// runChromium runs headless chromium with a fresh profile and a time limit
// and returns its standard output.
func runChromium(t *testing.T, bin string, args ...string) []byte {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	base := []string{
		"--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
		"--no-first-run", "--disable-component-update", "--disable-sync",
		"--user-data-dir=" + t.TempDir(),
	}
	cmd := exec.CommandContext(ctx, bin, append(base, args...)...)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	cmd.WaitDelay = 5 * time.Second
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium %s: %v (timeout: %v)\n%s", strings.Join(args, " "), err, ctx.Err(), tail(stderr.String(), 2000))
	}
	return stdout.Bytes()
}

// pdfText is the text of a PDF by pdftotext (poppler-utils, installed by
// .ci/setup), pages separated by form feeds.
func pdfText(t *testing.T, pdf string) string {
	t.Helper()
	bin, err := exec.LookPath("pdftotext")
	if err != nil {
		t.Fatal("pdftotext not found: install poppler-utils (.ci/setup does this)")
	}
	out, err := exec.Command(bin, "-layout", pdf, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	return string(out)
}

// vermillionPixels rasterises a PDF at 40 dpi and counts the pixels near
// the plots' vermillion (#D55E00).
func vermillionPixels(t *testing.T, pdf string) (red int) {
	t.Helper()
	bin, err := exec.LookPath("pdftoppm")
	if err != nil {
		t.Fatal("pdftoppm not found: install poppler-utils (.ci/setup does this)")
	}
	prefix := filepath.Join(t.TempDir(), "page")
	if out, err := exec.Command(bin, "-r", "40", "-png", pdf, prefix).CombinedOutput(); err != nil {
		t.Fatalf("pdftoppm: %v\n%s", err, out)
	}
	pngs, _ := filepath.Glob(prefix + "*.png")
	for _, name := range pngs {
		f, err := os.Open(name)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(f)
		f.Close()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		b := img.Bounds()
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				r, g, bl, _ := img.At(x, y).RGBA()
				r, g, bl = r>>8, g>>8, bl>>8
				if r > 180 && g > 60 && g < 130 && bl < 50 {
					red++
				}
			}
		}
	}
	return red
}

func tail(s string, n int) string {
	if len(s) > n {
		return "…" + s[len(s)-n:]
	}
	return s
}

// TestBrowserRendersReport opens the report of the bundled demo deliveries
// (testdata/demo, measured and judged by the real pipeline) in a real
// browser: the
// screenshot must decode at the window size and show a drawn page, the DOM
// after scripts ran must hold the summary table (with the sort buttons the
// script adds) and the plots, and printing must start every file on a new
// page. KWEIGH_BROWSER_OUT=DIR keeps the screenshot and PDF for a look.
func TestBrowserRendersReport(t *testing.T) {
	bin := audiotest.Chromium(t)
	dir := t.TempDir()
	page := demoSetPage(t)
	report := filepath.Join(dir, "report.html")
	if err := os.WriteFile(report, render(t, page), 0o644); err != nil {
		t.Fatal(err)
	}
	url := "file://" + report

	// Screenshot.
	shot := filepath.Join(dir, "report.png")
	const width, height = 1280, 2000
	runChromium(t, bin, "--screenshot="+shot, "--window-size=1280,2000", "--hide-scrollbars", url)
	f, err := os.Open(shot)
	if err != nil {
		t.Fatalf("no screenshot: %v", err)
	}
	img, err := png.Decode(f)
	f.Close()
	if err != nil {
		t.Fatalf("screenshot is not a PNG: %v", err)
	}
	if b := img.Bounds(); b.Dx() != width || b.Dy() != height {
		t.Errorf("screenshot is %dx%d, want %dx%d", b.Dx(), b.Dy(), width, height)
	}
	colours := map[uint32]bool{}
	inked := 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bl, _ := img.At(x, y).RGBA()
			colours[(r>>8)<<16|(g>>8)<<8|bl>>8] = true
			if r < 0xE000 || g < 0xE000 || bl < 0xE000 {
				inked++
			}
		}
	}
	share := float64(inked) / float64(b.Dx()*b.Dy()/4)
	// A blank or failed page has one or two colours; text, badges and the
	// plot's palette give hundreds with anti-aliasing.
	if len(colours) < 64 || share < 0.02 {
		t.Errorf("screenshot looks blank: %d distinct colours, %.1f %% of pixels not near-white", len(colours), 100*share)
	}

	// DOM after the page's script ran.
	dom := runChromium(t, bin, "--dump-dom", url)
	root, err := html.Parse(bytes.NewReader(dom))
	if err != nil {
		t.Fatalf("dumped DOM does not parse: %v", err)
	}
	tables := findAll(root, func(n *html.Node) bool { v, _ := attr(n, "id"); return n.DataAtom == atom.Table && v == "summary" })
	if len(tables) != 1 {
		t.Fatalf("dumped DOM has %d summary tables, want 1", len(tables))
	}
	rows := findAll(tables[0], func(n *html.Node) bool { _, ok := attr(n, "data-file"); return ok })
	if len(rows) != len(page.Entries) {
		t.Errorf("dumped DOM's summary has %d rows, want %d", len(rows), len(page.Entries))
	}
	if buttons := findAll(tables[0], func(n *html.Node) bool { return n.DataAtom == atom.Button }); len(buttons) == 0 {
		t.Error("the sort script did not run: no buttons in the summary headings")
	}
	plots := 0
	for _, svg := range findAll(root, func(n *html.Node) bool { return n.Data == "svg" }) {
		for _, title := range findAll(svg, func(n *html.Node) bool { return n.Data == "title" }) {
			if strings.HasPrefix(textOf(title), "Loudness over time") {
				plots++
			}
		}
	}
	if plots == 0 {
		t.Error("dumped DOM has no loudness plot <svg>")
	}

	// Print (Chromium's own print to PDF, its header and footer off): the
	// page's @page rules number every page ("page N of M") and each file
	// after the first starts a page, so there is at least one page per
	// file; pdftotext (poppler-utils) reads the printed text back.
	page.Record = Record{Job: "TW-2291", Client: "Harbourlight Television", Operator: "Mara Quillfeather"}
	if err := os.WriteFile(report, render(t, page), 0o644); err != nil {
		t.Fatal(err)
	}
	pdf := filepath.Join(dir, "report.pdf")
	runChromium(t, bin, "--print-to-pdf="+pdf, "--no-pdf-header-footer", url)
	raw, err := os.ReadFile(pdf)
	if err != nil || !bytes.HasPrefix(raw, []byte("%PDF-")) {
		t.Fatalf("print to PDF failed: %v", err)
	}
	pages := len(regexp.MustCompile(`/Type\s*/Page[^s]`).FindAll(raw, -1))
	if pages < len(page.Entries) {
		t.Errorf("printed report has %d pages, want at least %d (one page or more per file)", pages, len(page.Entries))
	}
	text := pdfText(t, pdf)
	perPage := strings.Split(text, "\f")
	numbered := 0
	for i, pg := range perPage {
		if strings.TrimSpace(pg) == "" {
			continue
		}
		if !strings.Contains(pg, fmt.Sprintf("page %d of %d", i+1, pages)) {
			t.Errorf("printed page %d has no page number %q", i+1, fmt.Sprintf("page %d of %d", i+1, pages))
			continue
		}
		numbered++
	}
	if numbered != pages {
		t.Errorf("%d of %d printed pages carry their number", numbered, pages)
	}
	for _, want := range []string{"TW-2291", "Harbourlight Television", "Approval", "Signature"} {
		if !strings.Contains(text, want) {
			t.Errorf("printed report lacks %q", want)
		}
	}
	// The red marks print red: the pages rasterised (pdftoppm, poppler-utils)
	// hold pixels of the vermillion the plots draw the ceiling and overs in
	// (#D55E00), which print-color-adjust keeps from being dropped.
	red := vermillionPixels(t, pdf)
	if red == 0 {
		t.Error("the printed report has no vermillion pixels: the red marks did not print in colour")
	}
	t.Logf("printed colours: %d vermillion pixels at 40 dpi", red)
	// Every file's heading is printed on each of its pages: on a page
	// holding the file's sheet, the running heading names its path.
	for _, e := range page.Entries {
		if !strings.Contains(text, filepath.Base(e.Result.Path)) {
			t.Errorf("printed report lacks %s", e.Result.Path)
		}
	}
	t.Logf("screenshot: %d colours, %.1f %% inked; PDF: %d pages", len(colours), 100*share, pages)

	if out := os.Getenv("KWEIGH_BROWSER_OUT"); out != "" {
		for _, name := range []string{"report.html", "report.png", "report.pdf"} {
			data, err := os.ReadFile(filepath.Join(dir, name))
			if err == nil {
				err = os.WriteFile(filepath.Join(out, name), data, 0o644)
			}
			if err != nil {
				t.Errorf("keeping %s: %v", name, err)
			}
		}
	}
}
