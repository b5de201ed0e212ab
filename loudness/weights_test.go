package loudness

import (
	"errors"
	"testing"
)

func TestWeights(t *testing.T) {
	for _, tc := range []struct {
		label string
		want  float64 // source
	}{
		{"M", 1.0},    // BS.1770: mono is one front channel, G = 1.0 (SOURCES.md §1)
		{"L", 1.0},    // BS.1770-4/5 Table 3, from memory
		{"R", 1.0},    // ditto
		{"C", 1.0},    // ditto
		{"LFE", 0},    // ditto: LFE excluded
		{"Ls", 1.41},  // ditto; corroborated by EBU Tech 3341 test 6
		{"Rs", 1.41},  // ditto
		{"Lb", 1.0},   // position rule: ±135° is outside 60°…120° (from memory)
		{"Rb", 1.0},   // ditto
		{"Lc", 1.0},   // position rule: front
		{"Rc", 1.0},   // ditto
		{"Cb", 1.0},   // position rule: 180°
		{"Tc", 1.0},   // position rule: elevation ≥ 30°
		{"Tfl", 1.0},  // ditto
		{"Tfc", 1.0},  // ditto
		{"Tfr", 1.0},  // ditto
		{"Tbl", 1.0},  // ditto
		{"Tbc", 1.0},  // ditto
		{"Tbr", 1.0},  // ditto
		{"Ch1", 1.0},  // generic channel: weighted as front (decode/layout.go contract)
		{"Ch17", 1.0}, // ditto
	} {
		got, err := Weights([]string{tc.label})
		if err != nil {
			t.Errorf("Weights(%q): %v", tc.label, err)
			continue
		}
		if got[0] != tc.want {
			t.Errorf("Weights(%q) = %v, want %v", tc.label, got[0], tc.want)
		}
	}
}

func TestWeightsLayouts(t *testing.T) {
	// 7.1 in channel-mask order: SL/SR take 1.41 and BL/BR 1.0 (issue 2;
	// BS.1770-4/5 position rule, from memory).
	got, err := Weights([]string{"L", "R", "C", "LFE", "Lb", "Rb", "Ls", "Rs"})
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{1, 1, 1, 0, 1, 1, 1.41, 1.41}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("7.1 weight %d = %v, want %v", i, got[i], want[i])
		}
	}
}

func TestWeightsUnknown(t *testing.T) {
	for _, bad := range []string{"", "X", "l", "Ch0", "Ch01", "Ch", "Ch-1", "LFE2"} {
		_, err := Weights([]string{"L", bad})
		var le *LabelError
		if !errors.As(err, &le) || le.Index != 1 || le.Label != bad {
			t.Errorf("Weights([L %q]) error = %v, want *LabelError at index 1", bad, err)
		}
	}
}

func TestPositionRule(t *testing.T) {
	for _, tc := range []struct {
		az, el, want float64 // BS.1770-4/5 position rule (SOURCES.md §1, from memory)
	}{
		{60, 0, 1.41}, {120, 0, 1.41}, {-90, 29.9, 1.41},
		{59.9, 0, 1.0}, {120.1, 0, 1.0}, {90, 30, 1.0}, {90, -30, 1.0}, {0, 0, 1.0}, {180, 0, 1.0},
	} {
		if got := positionWeight(position{tc.az, tc.el}); got != tc.want {
			t.Errorf("positionWeight(az %g, el %g) = %v, want %v", tc.az, tc.el, got, tc.want)
		}
	}
}
