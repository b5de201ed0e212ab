package rules

import (
	"fmt"
	"math"
)

// notFinite makes c a failure when v is NaN or ±Inf and reports whether it
// did. Such a value cannot come from a healthy measurement (package measure
// refuses samples that could produce one), but a record read from elsewhere
// may hold one, and compared with a limit it would pass or fail by accident:
// NaN is neither above nor below anything, and converting ±Inf to
// hundredths is undefined. So every check that compares a measured number
// asks here first, and the answer is always a failure.
func notFinite(c *Check, v float64, what string) bool {
	if !math.IsNaN(v) && !math.IsInf(v, 0) {
		return false
	}
	c.Verdict = Fail
	c.Measured = nil
	c.Reason = fmt.Sprintf("%s is %v, which is not a measurement: the figures of this file cannot be trusted", what, v)
	return true
}

// finite reports whether v is a number (not NaN, not ±Inf).
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
