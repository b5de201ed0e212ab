package rules

import "github.com/kweigh/kweigh/measure"

// Verdict is the outcome of one check or of a whole file.
type Verdict string

// Verdicts, from best to worst. A file's verdict is the worst of its checks;
// Error means the file could not be measured.
const (
	Pass  Verdict = "pass"
	Warn  Verdict = "warn"
	Fail  Verdict = "fail"
	Error Verdict = "error"
)

// Check is one judged requirement.
type Check struct {
	// ID is stable and machine-readable, e.g. "integrated", "true_peak",
	// "sample_rate", "trailing_silence".
	ID      string  `json:"id"`
	Verdict Verdict `json:"verdict"`
	// Measured is a number (float64, in Unit) or a string (e.g. "mp3");
	// nil when the figure is undefined. Loudness and peak figures are the
	// measurement's own, unrounded, so that a report prints them exactly as
	// it prints the file's figures; others are rounded to 0.01.
	Measured any    `json:"measured"`
	Unit     string `json:"unit,omitempty"`
	// Limit says what the spec requires, in words and numbers,
	// e.g. "-23.0 LUFS ±1.0 LU" or "≤ -1.0 dBTP".
	Limit string `json:"limit"`
	// Reason is one line in plain words.
	Reason string `json:"reason"`
}

// Unit returns the loudness unit reports print for r: the spec's, or LUFS
// for a file judged against no spec.
func (r *Result) Unit() string {
	if r == nil || r.LoudnessUnit == "" {
		return "LUFS"
	}
	return r.LoudnessUnit
}

// Result is a Measurement judged against a spec. Its JSON form is the
// measurement's keys plus spec, verdict, checks, suggested_gain_db.
type Result struct {
	*measure.Measurement
	Spec string `json:"spec"`
	// LoudnessUnit is the spec's word for loudness figures, "LUFS" or
	// "LKFS" (Spec.Unit): reports print loudness in it.
	LoudnessUnit string  `json:"loudness_unit,omitempty"`
	Verdict      Verdict `json:"verdict"`
	Checks       []Check `json:"checks"`
	// SuggestedGainDB is the gain that brings integrated loudness to the
	// spec's target (or, for a surround file whose fold-down is judged too,
	// puts both inside the limit), worked out to 0.01 dB from the figures
	// the reasons print; nil when no change is needed or no figure exists.
	SuggestedGainDB *float64 `json:"suggested_gain_db"`
	// LimiterReductionDB is how much peak reduction a true-peak limiter
	// would need after that gain (or without one, when none is suggested)
	// to keep the true peak under the ceiling, to 0.01 dB; nil when none.
	LimiterReductionDB *float64 `json:"limiter_reduction_db"`
	// Advice is the fix in one or two plain sentences.
	Advice string `json:"advice,omitempty"`
}
