package loudness

import (
	"fmt"
	"strconv"
	"strings"
)

// position is a loudspeaker direction in degrees: azimuth from straight
// ahead (positive to the left), elevation above the listener's ear plane.
type position struct {
	azimuth, elevation float64
}

// labelPositions places each channel label (package decode's vocabulary) at
// a nominal direction (ITU-R BS.775 for 5.1, BS.2051 for the others; from
// memory). Only the classes matter to the weighting rule below: surround
// (|azimuth| 60°…120°, low) or anything else.
var labelPositions = map[string]position{
	"M":   {0, 0},     // a mono channel is weighted as a front channel
	"L":   {30, 0},    // BS.775 front pair at ±30°
	"R":   {-30, 0},   //
	"C":   {0, 0},     //
	"Lc":  {15, 0},    // inner front pair, between L/R and C
	"Rc":  {-15, 0},   //
	"Ls":  {110, 0},   // BS.775 surrounds at ±100°…120°
	"Rs":  {-110, 0},  //
	"Lb":  {135, 0},   // BS.2051 back pair at ±135°…150°
	"Rb":  {-135, 0},  //
	"Cb":  {180, 0},   // back centre
	"Tc":  {0, 90},    // overhead
	"Tfl": {30, 45},   // upper layer, 30°…45° up
	"Tfc": {0, 45},    //
	"Tfr": {-30, 45},  //
	"Tbl": {135, 45},  //
	"Tbc": {180, 45},  //
	"Tbr": {-135, 45}, //
}

// Channel weights of ITU-R BS.1770-4/5 (SOURCES.md §1, from memory,
// surround weight corroborated by EBU Tech 3341 test 6).
const (
	frontWeight    = 1.0
	surroundWeight = 1.41
	lfeWeight      = 0.0 // the LFE channel is left out of loudness
)

// positionWeight is the BS.1770-4/5 rule: a low (|elevation| < 30°) channel
// at 60° ≤ |azimuth| ≤ 120° weighs 1.41, every other position 1.0.
func positionWeight(p position) float64 {
	az, el := abs(p.azimuth), abs(p.elevation)
	if el < 30 && az >= 60 && az <= 120 {
		return surroundWeight
	}
	return frontWeight
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// LabelError reports a channel label Weights does not know.
type LabelError struct {
	Index int    // 0-based channel index
	Label string // the label as given
}

func (e *LabelError) Error() string {
	return fmt.Sprintf("loudness: channel %d: unknown channel label %q (known: M L R C LFE Ls Rs Lb Rb Lc Rc Cb Tc Tfl Tfc Tfr Tbl Tbc Tbr Ch<n>)", e.Index+1, e.Label)
}

// Weights returns the BS.1770 channel weight for each label (package
// decode's label strings): 1.0 for M, L, R, C; 1.41 for Ls, Rs; 0 for LFE,
// which is thereby excluded; the BS.1770-4/5 position rule (60°…120°
// azimuth below 30° elevation → 1.41, otherwise 1.0) for the rest, which
// gives 1.0 for the back pair Lb/Rb (±135°), Cb and every top channel. A
// generic "Ch<n>" label is weighted as a front channel. An unknown label is
// a *LabelError.
func Weights(labels []string) ([]float64, error) {
	w := make([]float64, len(labels))
	for i, l := range labels {
		switch {
		case l == "LFE":
			w[i] = lfeWeight
		case isGenericLabel(l):
			w[i] = frontWeight
		default:
			p, ok := labelPositions[l]
			if !ok {
				return nil, &LabelError{Index: i, Label: l}
			}
			w[i] = positionWeight(p)
		}
	}
	return w, nil
}

// isGenericLabel reports whether l is "Ch<n>" with n a positive decimal
// number written without leading zeros.
func isGenericLabel(l string) bool {
	digits, ok := strings.CutPrefix(l, "Ch")
	if !ok {
		return false
	}
	n, err := strconv.Atoi(digits)
	return err == nil && n > 0 && strconv.Itoa(n) == digits
}
