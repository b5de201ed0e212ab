package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/watch"
)

func historyCommand() *cli.Command {
	return &cli.Command{
		Name:      "history",
		Usage:     "list what a watch ledger holds: file, verdict, when, where it went",
		ArgsUsage: "[INBOX]",
		Description: "Reads the ledger of 'kweigh watch' (safe while the watcher runs) and lists one line per file\n" +
			"version: when it was last handled, its verdict, its state, the file and where it went. The\n" +
			"ledger is --state, else INBOX/.kweigh, else .kweigh in the current folder.\n\n" +
			"--since takes a time (2026-12-01, 2026-12-01T14:00, RFC 3339) or a duration back from now (36h).",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "state", Usage: "the watcher's state `DIR`"},
			&cli.StringFlag{Name: "since", Usage: "only files handled at or after `TIME`"},
			&cli.StringFlag{Name: "format", Aliases: []string{"f"}, Value: "text", Usage: "text, json, jsonl or csv"},
		},
		Action: func(ctx context.Context, cmd *cli.Command) error {
			state := cmd.String("state")
			switch {
			case state != "":
			case cmd.Args().Len() == 1:
				state = filepath.Join(cmd.Args().First(), ".kweigh")
			case cmd.Args().Len() > 1:
				return usagef("name at most one inbox")
			default:
				state = ".kweigh"
			}
			since, err := parseSince(cmd.String("since"), time.Now())
			if err != nil {
				return usageError{err}
			}
			f := cmd.String("format")
			switch f {
			case "text", "json", "jsonl", "csv":
			default:
				return usagef("--format %s: history writes text, json, jsonl or csv", f)
			}
			return runHistory(ctx, state, since, f, cmd.Root().Writer)
		},
	}
}

// parseSince reads --since: a date, a date and time (RFC 3339 or without
// seconds or zone, taken as local time), or a duration back from now.
func parseSince(s string, now time.Time) (time.Time, error) {
	if s == "" {
		return time.Time{}, nil
	}
	if d, err := time.ParseDuration(s); err == nil {
		if d < 0 {
			return time.Time{}, fmt.Errorf("--since %s: a duration back from now must be positive", s)
		}
		return now.Add(-d), nil
	}
	if t, err := time.Parse(time.RFC3339, s); err == nil {
		return t, nil
	}
	for _, layout := range []string{"2006-01-02T15:04:05", "2006-01-02T15:04", "2006-01-02 15:04", "2006-01-02"} {
		if t, err := time.ParseInLocation(layout, s, time.Local); err == nil {
			return t, nil
		}
	}
	return time.Time{}, fmt.Errorf("--since %q: give a time such as 2026-12-01, 2026-12-01T14:00 or 2026-12-01T14:00:00Z, or a duration such as 36h", s)
}

// historyRow is one ledger row as history shows it.
type historyRow struct {
	File        string  `json:"file"`
	Verdict     *string `json:"verdict"`
	State       string  `json:"state"`
	When        string  `json:"when"`
	PlacedPath  *string `json:"placed_path"`
	ReportJSON  *string `json:"report_json"`
	ReportHTML  *string `json:"report_html"`
	Size        int64   `json:"size"`
	ModTime     string  `json:"mtime"`
	Fingerprint *string `json:"fingerprint"`
	SeenAt      string  `json:"seen_at"`
	JudgedAt    *string `json:"judged_at"`
	PlacedAt    *string `json:"placed_at"`
	Error       *string `json:"error"`
}

func optional(s string) *string {
	if s == "" {
		return nil
	}
	return &s
}

func stamp(t time.Time) string { return t.UTC().Format(time.RFC3339) }

func optionalTime(t time.Time) *string {
	if t.IsZero() {
		return nil
	}
	return optional(stamp(t))
}

func newHistoryRow(e watch.Entry) historyRow {
	r := historyRow{
		File: e.Path(), Verdict: optional(e.Verdict), State: string(e.State), When: stamp(e.UpdatedAt),
		PlacedPath: optional(e.Dest), Size: e.Size, ModTime: e.ModTime.UTC().Format(time.RFC3339Nano),
		Fingerprint: optional(e.Fingerprint), SeenAt: stamp(e.SeenAt), JudgedAt: optionalTime(e.JudgedAt),
		PlacedAt: optionalTime(e.PlacedAt), Error: optional(e.Error),
	}
	if e.Reports != "" && e.Stem != "" {
		base := filepath.Join(e.Reports, filepath.FromSlash(e.Stem))
		r.ReportJSON, r.ReportHTML = optional(base+".json"), optional(base+".html")
	}
	return r
}

func deref(p *string) string {
	if p == nil {
		return ""
	}
	return *p
}

// runHistory lists the ledger rows handled at or after since.
func runHistory(ctx context.Context, state string, since time.Time, format string, stdout io.Writer) error {
	led, err := watch.OpenLedgerReader(state)
	if err != nil {
		return usageError{err}
	}
	defer led.Close()
	entries, err := led.Since(ctx, since)
	if err != nil {
		return err
	}
	rows := make([]historyRow, len(entries))
	for i, e := range entries {
		rows[i] = newHistoryRow(e)
	}
	switch format {
	case "json":
		doc := struct {
			Tool      string       `json:"tool"`
			Version   string       `json:"version"`
			Generated string       `json:"generated"`
			State     string       `json:"state"`
			Files     []historyRow `json:"files"`
		}{"kweigh", version, stamp(time.Now()), state, rows}
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(doc)
	case "jsonl":
		enc := json.NewEncoder(stdout)
		for _, r := range rows {
			if err := enc.Encode(r); err != nil {
				return err
			}
		}
		return nil
	case "csv":
		w := csv.NewWriter(stdout)
		w.Write([]string{"file", "verdict", "state", "when", "placed_path", "report_json", "size", "mtime", "fingerprint", "seen_at", "judged_at", "placed_at", "error"})
		for _, r := range rows {
			w.Write([]string{r.File, deref(r.Verdict), r.State, r.When, deref(r.PlacedPath), deref(r.ReportJSON),
				strconv.FormatInt(r.Size, 10), r.ModTime, deref(r.Fingerprint), r.SeenAt, deref(r.JudgedAt), deref(r.PlacedAt), deref(r.Error)})
		}
		w.Flush()
		return w.Error()
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "WHEN\tVERDICT\tSTATE\tFILE\tWENT TO")
	for _, r := range rows {
		where := deref(r.PlacedPath)
		if where == "" && r.State == string(watch.StatePlaced) {
			where = "(stays)"
		}
		if r.Error != nil {
			where = strings.TrimSpace(where + "  " + *r.Error)
		}
		verdict := deref(r.Verdict)
		if verdict == "" {
			verdict = "-"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", r.When, verdict, r.State, reports.Printable(r.File), reports.Printable(where))
	}
	if len(rows) == 0 {
		fmt.Fprintln(tw, "(nothing in the ledger for that time)")
	}
	return tw.Flush()
}
