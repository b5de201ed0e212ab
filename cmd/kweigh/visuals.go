package main

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"
	"unicode"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/reports/htmlpage"
	"github.com/kweigh/kweigh/rules"
)

// cautionText heads every HTML report.
const cautionText = "Full-scale test signals and gain increases can damage hearing and loudspeakers: keep monitoring " +
	"levels down when auditioning. A pass is not a broadcaster's or regulator's acceptance; local regulation " +
	"and the receiving party's own QC decide."

// writeVisuals writes the --report page and the --plots SVGs. A measure run
// passes measurements; a check run passes results with their specs. Each
// file is renamed into place only when complete. An interrupted run writes
// neither: a page or plots of a partial run must not replace a complete
// one.
func writeVisuals(files *runFiles, q qcOptions, interrupted bool, stderr io.Writer, ms []*measure.Measurement, rs []*rules.Result, specs []*rules.Spec) error {
	if files.report == nil && files.plots == "" && files.markers == nil {
		return nil
	}
	if interrupted {
		files.report.abort()
		files.markers.abort()
		fmt.Fprintln(stderr, "kweigh: interrupted: --report, --plots and --markers not written (previous files are kept)")
		return nil
	}
	if files.markers != nil {
		all := ms
		for _, r := range rs {
			all = append(all, r.Measurement)
		}
		if err := writePending(files.markers, func(w *bufio.Writer) error {
			mw := reports.NewMarkerWriter(w)
			for _, m := range all {
				if err := mw.Write(m); err != nil {
					return err
				}
			}
			return mw.Close()
		}); err != nil {
			return fmt.Errorf("--markers: %w", err)
		}
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
	if files.report != nil {
		title := "kweigh loudness measurement"
		if rs != nil {
			title = "kweigh delivery check"
		}
		// The record's fields: the first spec's [record], overridden by
		// the command line's --job, --client, --operator, --notes.
		var record rules.RecordFields
		for _, sp := range specs {
			if sp != nil && sp.Record != (rules.RecordFields{}) {
				record = sp.Record
				break
			}
		}
		record = record.Merge(q.record)
		page := htmlpage.Page{Title: title, Generated: time.Now(), Specs: specNames, Entries: entries, Caution: cautionText,
			Record: htmlpage.RecordFrom(record), Paper: q.paper}
		if err := writePending(files.report, func(w *bufio.Writer) error { return htmlpage.Write(w, page) }); err != nil {
			return fmt.Errorf("--report: %w", err)
		}
	}
	if files.plots != "" {
		for _, e := range entries {
			if e.Result.Error != "" || e.Result.Series == nil {
				continue
			}
			p, err := createPending(filepath.Join(files.plots, plotName(e.Result.Path)))
			if err != nil {
				return fmt.Errorf("--plots: %w", err)
			}
			if err := writePending(p, func(w *bufio.Writer) error { return htmlpage.WritePlotSVG(w, e) }); err != nil {
				return fmt.Errorf("--plots: %w", err)
			}
		}
	}
	return nil
}

// writePending writes a pending file through a buffer and puts it in place
// only when writing and flushing succeeded; on any error the temporary file
// is removed.
func writePending(p *pendingFile, write func(*bufio.Writer) error) error {
	w := bufio.NewWriter(p)
	err := write(w)
	if ferr := w.Flush(); err == nil {
		err = ferr
	}
	if err != nil {
		p.abort()
		return fmt.Errorf("%s: %w", p.final, err)
	}
	return p.commit()
}

// plotStemRunes bounds the readable part of a plot name, well inside the
// 255-byte name limit of common file systems even in multi-byte scripts.
const plotStemRunes = 60

// plotName is the SVG file name for a measured file: a readable stem (the
// file name, safe characters only, cut to plotStemRunes) and a short hash of
// the whole cleaned path, so files of the same name in different folders,
// or paths that differ only in characters the stem drops, never share a
// plot, and a path of any length makes a valid name.
func plotName(path string) string {
	clean := filepath.ToSlash(filepath.Clean(path))
	sum := sha256.Sum256([]byte(clean))
	base := strings.TrimSuffix(filepath.Base(clean), filepath.Ext(clean))
	stem := strings.Map(func(r rune) rune {
		if unicode.IsLetter(r) || unicode.IsDigit(r) || r == '-' || r == '_' || r == '.' {
			return r
		}
		return '_'
	}, base)
	stem = strings.TrimLeft(stem, ".")
	if r := []rune(stem); len(r) > plotStemRunes {
		stem = string(r[:plotStemRunes])
	}
	if stem == "" {
		stem = "plot"
	}
	return stem + "-" + hex.EncodeToString(sum[:4]) + ".svg"
}
