package main

import (
	"bufio"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports/htmlpage"
	"github.com/kweigh/kweigh/rules"
)

// cautionText heads every HTML report.
const cautionText = "Full-scale test signals and gain increases can damage hearing and loudspeakers: keep monitoring " +
	"levels down when auditioning. A pass is not a broadcaster's or regulator's acceptance; local regulation " +
	"and the receiving party's own QC decide."

// writeVisuals writes the --report page and the --plots SVGs. A measure run
// passes measurements; a check run passes results with their specs.
func writeVisuals(o batchOptions, ms []*measure.Measurement, rs []*rules.Result, specs []*rules.Spec) error {
	if o.report == "" && o.plots == "" {
		return nil
	}
	var entries []htmlpage.Entry
	specNames := []string{}
	seenSpec := map[string]bool{}
	for _, m := range ms {
		entries = append(entries, htmlpage.Entry{Result: &rules.Result{Measurement: m}})
	}
	for i, r := range rs {
		entries = append(entries, htmlpage.Entry{Result: r, Target: htmlpage.TargetFor(specs[i], r.Channels)})
		if r.Spec != "" && !seenSpec[r.Spec] {
			seenSpec[r.Spec] = true
			specNames = append(specNames, r.Spec)
		}
	}
	if o.report != "" {
		title := "kweigh loudness measurement"
		if rs != nil {
			title = "kweigh delivery check"
		}
		page := htmlpage.Page{Title: title, Generated: time.Now(), Specs: specNames, Entries: entries, Caution: cautionText}
		if err := writeFile(o.report, func(w *bufio.Writer) error { return htmlpage.Write(w, page) }); err != nil {
			return fmt.Errorf("--report: %w", err)
		}
	}
	if o.plots != "" {
		if err := ensureDir(o.plots); err != nil {
			return err
		}
		for _, e := range entries {
			if e.Result.Error != "" || e.Result.Series == nil {
				continue
			}
			path := filepath.Join(o.plots, plotName(e.Result.Path))
			if err := writeFile(path, func(w *bufio.Writer) error { return htmlpage.WritePlotSVG(w, e) }); err != nil {
				return fmt.Errorf("--plots: %w", err)
			}
		}
	}
	return nil
}

// writeFile writes a file through a buffer and reports the first error of
// writing, flushing or closing.
func writeFile(path string, write func(*bufio.Writer) error) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	err = write(w)
	if ferr := w.Flush(); err == nil {
		err = ferr
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}
