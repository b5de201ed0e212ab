package htmlpage

import (
	"context"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"

	"golang.org/x/net/html"
	"golang.org/x/net/html/atom"

	_ "github.com/kweigh/kweigh/decode/aiff"
	_ "github.com/kweigh/kweigh/decode/flac"
	_ "github.com/kweigh/kweigh/decode/mp3"
	_ "github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// The bundled demo deliveries (testdata/demo at the repository root, made
// by testdata/make-demo.go): three invented outlets, each folder with its
// own kweigh.toml. The report of this set is what `kweigh check
// testdata/demo --report FILE` writes, built here from the real pipeline:
// decoders, measure.File, rules.LoadFile, rules.Evaluate and TargetFor.
const (
	// repoRoot is the repository root seen from this package's folder.
	repoRoot = "../.."
	// demoSetDir is the demo set relative to the repository root, the form
	// its paths take in the report (so the golden file does not depend on
	// where the checkout lives).
	demoSetDir = "testdata/demo"
	// folderSpec is the per-folder spec file, as the CLI names it.
	folderSpec = "kweigh.toml"
)

var (
	demoSetOnce    sync.Once
	demoSetEntries []Entry
	demoSetSpecs   []string
	demoSetErr     error
)

// demoSetFiles lists the demo set's audio files relative to the repository
// root, in lexical order (the CLI's order): every regular file but the
// folder specs and hidden files.
func demoSetFiles() ([]string, error) {
	var files []string
	err := filepath.WalkDir(filepath.Join(repoRoot, demoSetDir), func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() || d.Name() == folderSpec || strings.HasPrefix(d.Name(), ".") {
			return nil
		}
		rel, err := filepath.Rel(repoRoot, path)
		files = append(files, filepath.ToSlash(rel))
		return err
	})
	sort.Strings(files)
	return files, err
}

// measureDemoSet measures and judges every demo file from the repository
// root, so that paths read "testdata/demo/...".
func measureDemoSet() error {
	files, err := demoSetFiles()
	if err != nil {
		return err
	}
	wd, err := os.Getwd()
	if err != nil {
		return err
	}
	if err := os.Chdir(repoRoot); err != nil {
		return err
	}
	defer os.Chdir(wd)
	specs := map[string]*rules.Spec{}
	for _, path := range files {
		specPath := filepath.Join(filepath.Dir(path), folderSpec)
		spec, ok := specs[specPath]
		if !ok {
			if spec, err = rules.LoadFile(specPath); err != nil {
				return err
			}
			specs[specPath] = spec
			demoSetSpecs = append(demoSetSpecs, spec.ID)
		}
		m := measure.File(context.Background(), path, measure.Options{KeepSeries: true})
		r := rules.Evaluate(spec, m)
		demoSetEntries = append(demoSetEntries, Entry{Result: &r, Target: TargetFor(spec, m.Channels)})
	}
	return nil
}

// demoSetPage is the report of the bundled demo deliveries, with the
// report time pinned. The demo set is measured once per test binary;
// callers must not modify the results.
func demoSetPage(t testing.TB) Page {
	t.Helper()
	demoSetOnce.Do(func() { demoSetErr = measureDemoSet() })
	if demoSetErr != nil {
		t.Fatalf("measuring the demo set: %v", demoSetErr)
	}
	return Page{
		Title:     "kweigh delivery check — bundled demo deliveries",
		Generated: demoTime,
		Specs:     demoSetSpecs,
		Entries:   demoSetEntries,
		Caution:   demoCaution,
	}
}

// TestDemoSetReport checks the demo set's report: every demo file is in
// it, with the numbers of its JSON record.
func TestDemoSetReport(t *testing.T) {
	page := demoSetPage(t)
	files, err := demoSetFiles()
	if err != nil {
		t.Fatal(err)
	}
	if len(files) == 0 {
		t.Fatalf("no demo files under %s", filepath.Join(repoRoot, demoSetDir))
	}
	root := parseHTML(t, render(t, page))
	shown := map[string]int{}
	for _, n := range findAll(root, func(n *html.Node) bool { _, ok := attr(n, "data-file"); return ok }) {
		p, _ := attr(n, "data-file")
		shown[p]++
	}
	headings := map[string]bool{}
	for _, n := range findAll(root, func(n *html.Node) bool { return n.DataAtom == atom.H2 }) {
		headings[textOf(n)] = true
	}
	for i, f := range files {
		if shown[f] != 1 {
			t.Errorf("%s: %d summary rows, want 1", f, shown[f])
		}
		if want := strconv.Itoa(i+1) + ". " + f; !headings[want] {
			t.Errorf("no section heading %q", want)
		}
	}
	if len(shown) != len(files) {
		t.Errorf("summary lists %d files, the demo set has %d", len(shown), len(files))
	}
	checkReportContent(t, page)
}
