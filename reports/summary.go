package reports

import (
	"fmt"
	"strings"
	"time"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// Summary totals a run. Build it with Add (check) or AddMeasurement
// (measure) as the records come in, set Elapsed, and pass it to Close.
type Summary struct {
	Files  int
	Passed int
	Warned int
	Failed int
	// Errors counts files that could not be measured or checked.
	Errors int
	// Damaged counts measure's files whose audio is damaged: measured only
	// as far as it decoded (check fails them instead).
	Damaged int
	// Undeclared counts measure's files that hold audio-like data past
	// what their header declares: measured only as far as declared.
	Undeclared int
	// AudioSeconds is the total duration of the files measured.
	AudioSeconds float64
	// Elapsed is the wall time of the run; zero when unknown.
	Elapsed time.Duration
	// Interrupted is set when the run was stopped (a signal, a cancelled
	// context) before every file was done; Unfinished counts the files
	// left out. Every report then says so.
	Interrupted bool
	Unfinished  int
}

// Add counts one check result.
func (s *Summary) Add(r *rules.Result) {
	s.Files++
	switch {
	case r.Verdict == rules.Error || r.Measurement == nil || r.Measurement.Error != "":
		s.Errors++
	case r.Verdict == rules.Fail:
		s.Failed++
	case r.Verdict == rules.Warn:
		s.Warned++
	default:
		s.Passed++
	}
	if r.Measurement != nil && r.Measurement.Error == "" {
		s.AudioSeconds += r.DurationS
	}
}

// AddMeasurement counts one measurement.
func (s *Summary) AddMeasurement(m *measure.Measurement) {
	s.Files++
	if m.Error != "" {
		s.Errors++
		return
	}
	if m.Damaged != "" {
		s.Damaged++
	}
	if m.Undeclared != nil {
		s.Undeclared++
	}
	s.AudioSeconds += m.DurationS
}

// Measured returns the number of files that could be measured.
func (s Summary) Measured() int { return s.Files - s.Errors }

// String returns the check summary in one line, e.g.
// "2 passed, 1 warned, 1 failed, 0 errors · 4 files, 1:52:10.4 of audio checked in 3.2 s".
func (s Summary) String() string {
	var b strings.Builder
	b.WriteString(s.interruption())
	fmt.Fprintf(&b, "%d passed, %d warned, %d failed, %s · %s, %s of audio checked",
		s.Passed, s.Warned, s.Failed, plural(s.Errors, "error"), plural(s.Files, "file"), Duration(s.AudioSeconds))
	if s.Elapsed > 0 {
		fmt.Fprintf(&b, " in %s", WallTime(s.Elapsed))
	}
	return b.String()
}

// MeasureString returns the measure summary in one line, e.g.
// "3 files measured, 1 could not be · 1:52:10.4 of audio in 3.2 s".
func (s Summary) MeasureString() string {
	var b strings.Builder
	b.WriteString(s.interruption())
	fmt.Fprintf(&b, "%s measured", plural(s.Measured(), "file"))
	if s.Damaged > 0 {
		fmt.Fprintf(&b, " (%d only in part: damaged)", s.Damaged)
	}
	if s.Undeclared > 0 {
		fmt.Fprintf(&b, " (%d only as far as the header declares)", s.Undeclared)
	}
	if s.Errors > 0 {
		fmt.Fprintf(&b, ", %d could not be", s.Errors)
	}
	fmt.Fprintf(&b, " · %s of audio", Duration(s.AudioSeconds))
	if s.Elapsed > 0 {
		fmt.Fprintf(&b, " in %s", WallTime(s.Elapsed))
	}
	return b.String()
}

// interruption heads an interrupted run's summary line.
func (s Summary) interruption() string {
	if !s.Interrupted {
		return ""
	}
	return fmt.Sprintf("INTERRUPTED: %s not done · ", plural(s.Unfinished, "file"))
}

func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}
