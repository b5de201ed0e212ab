package watch

import (
	"fmt"
	"os"
	"strconv"
	"strings"
	"sync"
)

// PauseEnv names the test-support variable that stops the watcher at a
// named step so a test can kill the real process there with SIGKILL:
// "STEP" or "STEP:N" (the N-th time the step is reached, counting from 1).
// Steps: judging (after the judging state is committed, before the judge
// runs), judged (after the verdict and the report pair are committed, before
// the move), moving (before each move attempt), copied (a move across file systems has
// copied the file into place but not yet removed the source), moved (after the move,
// before placed is committed). On reaching it the watcher prints
// "kweigh watch: test pause at STEP: PATH" to stderr and waits forever.
// Nothing else reads it; it is not an option for users.
const PauseEnv = "KWEIGH_WATCH_TEST_PAUSE"

var pause = struct {
	sync.Mutex
	step  string
	nth   int
	count int
}{}

func init() {
	v := os.Getenv(PauseEnv)
	if v == "" {
		return
	}
	step, n, _ := strings.Cut(v, ":")
	pause.step, pause.nth = step, 1
	if k, err := strconv.Atoi(n); err == nil && k > 0 {
		pause.nth = k
	}
}

// testPause stops here forever when PauseEnv names this step.
func testPause(step, path string) {
	if pause.step == "" {
		return
	}
	pause.Lock()
	if pause.step != step {
		pause.Unlock()
		return
	}
	pause.count++
	hit := pause.count == pause.nth
	pause.Unlock()
	if hit {
		fmt.Fprintf(os.Stderr, "kweigh watch: test pause at %s: %s\n", step, path)
		select {}
	}
}
