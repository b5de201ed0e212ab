package watch

import (
	"context"
)

// Judgement is what judging one file gives the watcher.
type Judgement struct {
	// Verdict is the file's verdict: "pass", "warn", "fail" or "error" (a
	// file that could not be measured or had no spec).
	Verdict string
	// Skipped is set for a file that is not audio and whose name does not
	// say it is: it is left where it is, without a report.
	Skipped bool
	// Problem says in words why the file is an error or was skipped.
	Problem string
	// Record is the file's `kweigh check` record, one JSON object.
	Record []byte
	// Page is the file's HTML QC page.
	Page []byte
}

// JudgeFunc judges the file at path, found in the inbox root (the spec is
// resolved between the two). A file that cannot be read or measured is a
// Judgement with Verdict "error"; an error is returned only when ctx was
// cancelled before the judgement was complete, and the file is then judged
// again later.
type JudgeFunc func(ctx context.Context, path, root string) (Judgement, error)
