package watch_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"

	"github.com/kweigh/kweigh/rules"
	"github.com/kweigh/kweigh/watch"
)

// A QC desk's drop folder judged once: every file that has settled is
// judged against EBU R 128, gets its report pair, and is moved to passed/
// or failed/. Run without Once, the same call keeps watching until its
// context is cancelled.
func ExampleRun() {
	root, _ := os.MkdirTemp("", "kweigh-example")
	defer os.RemoveAll(root)
	inbox := filepath.Join(root, "drop")
	os.MkdirAll(inbox, 0o755)
	// Not audio: left where it is, without a report.
	os.WriteFile(filepath.Join(inbox, "cue-sheet.txt"), []byte("Quayside Sessions ep. 5\n"), 0o644)
	// A file still being uploaded: never taken.
	os.WriteFile(filepath.Join(inbox, "ep5.wav.part"), []byte("RIFF…"), 0o644)
	// A broken delivery: judged an error, moved to failed/.
	os.WriteFile(filepath.Join(inbox, "ep5.wav"), []byte("RIFF, then nothing useful"), 0o644)

	spec, _ := rules.Lookup("ebu-r128")
	sum, err := watch.Run(context.Background(), watch.Options{
		Inboxes: []string{inbox},
		Passed:  filepath.Join(root, "passed"),
		Failed:  filepath.Join(root, "failed"),
		Settle:  50e6, // 50 ms
		Once:    true,
		Judge:   watch.CheckJudge(watch.JudgeOptions{Spec: spec}),
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("judged %d, errors %d, skipped %d\n", sum.Files, sum.Errors, sum.Skipped)
	_, err = os.Stat(filepath.Join(root, "failed", "ep5.wav"))
	fmt.Println("ep5.wav in failed/:", err == nil)
	_, err = os.Stat(filepath.Join(inbox, ".kweigh", "reports", "ep5.wav.html"))
	fmt.Println("its QC page written:", err == nil)
	// Output:
	// judged 1, errors 1, skipped 1
	// ep5.wav in failed/: true
	// its QC page written: true
}
