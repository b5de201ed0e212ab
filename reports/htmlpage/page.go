package htmlpage

import (
	"errors"
	"fmt"
	"io"
	"time"

	"github.com/kweigh/kweigh/rules"
)

// Entry is one file of a run: its judged measurement and the spec limits
// to draw. For a `measure` run Result.Verdict is empty, Result.Checks is
// nil and Target is usually zero.
type Entry struct {
	Result *rules.Result
	Target Target
}

// Page is everything one report shows.
type Page struct {
	// Title heads the page, e.g. "Delivery check — Harbour Lights S2".
	Title string
	// Generated is printed as the report's time; callers pass the clock
	// (and tests a fixed time) so the output is reproducible.
	Generated time.Time
	// Specs names the spec or specs the run judged against; empty for a
	// `measure` run.
	Specs []string
	// Entries are the files, in the run's stable order.
	Entries []Entry
	// Caution is the hearing/equipment and not-a-certification notice,
	// printed near the top of the page.
	Caution string
	// Record is the QC record's header (job, client, operator, notes).
	Record Record
	// Paper is the printed page size, PaperA4 (the default) or
	// PaperLetter.
	Paper string
}

// ErrNoResult is returned (wrapped with the entry's position) when an entry
// has no Result or no Measurement: the report would otherwise silently leave
// a file out.
var ErrNoResult = errors.New("entry has no measurement")

// Write writes page as one self-contained HTML document: inline CSS
// (screen and print), inline SVG plots and a short inline script that only
// adds table sorting. Nothing is loaded from elsewhere, so the file opens
// offline and can be sent as is.
func Write(w io.Writer, page Page) error {
	view, err := buildPage(page)
	if err != nil {
		return err
	}
	if err := pageTemplate.Execute(w, view); err != nil {
		return fmt.Errorf("htmlpage: writing report: %w", err)
	}
	return nil
}

// WritePlotSVG writes entry's loudness-over-time plot as a standalone SVG
// document (with XML declaration and namespace), the form the CLI's plot
// directory holds, one file per measured file.
func WritePlotSVG(w io.Writer, entry Entry) error {
	if err := checkEntry(0, entry); err != nil {
		return err
	}
	svg := loudnessPlot(entry, "p-", true)
	if _, err := io.WriteString(w, svg); err != nil {
		return fmt.Errorf("htmlpage: writing plot of %s: %w", entry.Result.Path, err)
	}
	return nil
}

func checkEntry(i int, e Entry) error {
	if e.Result == nil || e.Result.Measurement == nil {
		return fmt.Errorf("htmlpage: entry %d: %w", i+1, ErrNoResult)
	}
	return nil
}
