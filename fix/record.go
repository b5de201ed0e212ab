package fix

import "github.com/kweigh/kweigh/rules"

// Action says what was done to a file.
type Action string

// The actions of a Record, as they appear in JSON.
const (
	NoneNeeded      Action = "none needed"
	Gain            Action = "gain"
	GainAndLimiting Action = "gain and limiting"
	Refused         Action = "refused"
	Failed          Action = "error"
)

// Record is the outcome for one file: what was done, with which figures,
// and the judgement of the input (Before) and of what was written (After,
// measured from the written file). Its JSON form is the per-file object of
// `kweigh fix --format json`.
type Record struct {
	Path string `json:"path"`
	// Output is the file written (the input itself with in-place
	// replacement), or null when nothing was written.
	Output *string `json:"output"`
	Action Action  `json:"action"`
	// GainDB is the static gain applied (positive: louder); LimitingDB the
	// deepest gain reduction the limiter applied on top of it. Null when
	// not applied; in a dry run, the planned figures. Unrounded, like every
	// figure in kweigh's JSON.
	GainDB     *float64 `json:"gain_db"`
	LimitingDB *float64 `json:"limiting_db"`
	// Before judges the input, After the written output (for "none
	// needed", the input again); After is null when nothing was written.
	Before *rules.Result `json:"before"`
	After  *rules.Result `json:"after"`
	// Passes is how many candidate corrections were measured.
	Passes int `json:"passes"`
	// SizeRatio is the output's size over the input's (FLAC and MP3
	// re-encodes), null otherwise.
	SizeRatio *float64 `json:"size_ratio"`
	// Reason says in plain words why a file was refused or failed, or what
	// a dry run would do.
	Reason string   `json:"reason,omitempty"`
	Notes  []string `json:"notes"`
	// Err is the error behind a Failed action (not part of the JSON).
	Err error `json:"-"`
}

// Outcome sorts a record for the exit status: OK (the output, or the
// untouched input, passes; warnings allowed), NotFixed (refused, or still
// failing) or Trouble (an error).
func (r *Record) Outcome() Outcome {
	switch r.Action {
	case Failed:
		return Trouble
	case Refused:
		return NotFixed
	}
	res := r.After
	if res == nil {
		if r.Output == nil && r.Before != nil { // a dry run
			return OK
		}
		return NotFixed
	}
	if res.Verdict == rules.Pass || res.Verdict == rules.Warn {
		return OK
	}
	if res.Verdict == rules.Error {
		return Trouble
	}
	return NotFixed
}

// Outcome is a record's contribution to the exit status.
type Outcome int

// Outcomes, from best to worst.
const (
	OK Outcome = iota
	NotFixed
	Trouble
)
