package rules

import (
	"errors"
	"slices"
	"strings"
	"testing"
)

// TestBuiltinValues checks every built-in spec against its row in the
// project's standards sheet (SOURCES.md §4), which cites the document and
// marks how each value was obtained.
func TestBuiltinValues(t *testing.T) {
	tests := []struct {
		id             string
		target         *float64 // integrated target, LUFS
		tolerance      float64  // ± LU
		min, max       *float64 // integrated window, LUFS
		mono           *float64 // mono target, LUFS
		truePeak       float64  // maximum true peak, dBTP
		maxShortTerm   *float64 // LUFS
		marker         string   // marker that must appear in the integrated source
		truePeakMarker string   // marker that must appear in the true-peak source
	}{
		// EBU R 128 v4.0 (2020): -23.0 LUFS, ±1.0 LU production [doc]; -1 dBTP [desc].
		{id: "ebu-r128", target: ptr(-23.0), tolerance: 1.0, truePeak: -1, marker: "[doc]", truePeakMarker: "[desc]"},
		// EBU R 128 v4.0 (2020): ±0.2 LU for QC measurement [doc]; -1 dBTP [desc].
		{id: "ebu-r128-qc", target: ptr(-23.0), tolerance: 0.2, truePeak: -1, marker: "[doc]", truePeakMarker: "[desc]"},
		// EBU R 128 s1 (2016): -23.0 LUFS [desc], ±0.5 LU [memory], -1 dBTP, max S ≤ -18 LUFS [desc].
		{id: "ebu-r128-s1", target: ptr(-23.0), tolerance: 0.5, truePeak: -1, maxShortTerm: ptr(-18.0), marker: "[memory]", truePeakMarker: "[desc]"},
		// ATSC A/85:2013: -24 LKFS ±2 dB [desc]; -2 dBTP [memory].
		{id: "atsc-a85", target: ptr(-24.0), tolerance: 2.0, truePeak: -2, marker: "[desc]", truePeakMarker: "[memory]"},
		// ARIB TR-B32: -24 LKFS ±1 dB [desc]; -1 dBTP [memory].
		{id: "arib-tr-b32", target: ptr(-24.0), tolerance: 1.0, truePeak: -1, marker: "[desc]", truePeakMarker: "[memory]"},
		// Free TV Australia OP-59: -24 LKFS [desc], ±1 LU [memory]; -2 dBTP [memory].
		{id: "op-59", target: ptr(-24.0), tolerance: 1.0, truePeak: -2, marker: "[memory]", truePeakMarker: "[memory]"},
		// AES TD1004 (2015): -16 to -20 LUFS window [desc]; -1 dBTP [memory].
		{id: "aes-td1004", min: ptr(-20.0), max: ptr(-16.0), truePeak: -1, marker: "[desc]", truePeakMarker: "[memory]"},
		// AES TD1008 (2021): speech -18 LUFS, ±2 LU mixed [desc]; -1 dBTP [memory].
		{id: "aes-td1008", target: ptr(-18.0), tolerance: 2.0, truePeak: -1, marker: "[desc]", truePeakMarker: "[memory]"},
		// Podcast practice: -16 LUFS stereo, -19 LUFS mono, ±1 LU, -1 dBTP (common practice, no published source).
		{id: "podcast", target: ptr(-16.0), tolerance: 1.0, mono: ptr(-19.0), truePeak: -1, marker: "common practice", truePeakMarker: "common practice"},
	}
	if got, want := BuiltinIDs(), []string{"ebu-r128", "ebu-r128-qc", "ebu-r128-s1", "atsc-a85", "arib-tr-b32", "op-59", "aes-td1004", "aes-td1008", "podcast"}; !slices.Equal(got, want) {
		t.Fatalf("BuiltinIDs() = %v, want %v", got, want)
	}
	for _, tt := range tests {
		t.Run(tt.id, func(t *testing.T) {
			s := mustLookup(t, tt.id)
			l := s.Loudness
			eqPtr(t, "target", l.TargetLUFS, tt.target)
			eqPtr(t, "min integrated", l.MinIntegratedLUFS, tt.min)
			eqPtr(t, "max integrated", l.MaxIntegratedLUFS, tt.max)
			eqPtr(t, "mono target", l.MonoTargetLUFS, tt.mono)
			eqPtr(t, "max short-term", l.MaxShortTermLUFS, tt.maxShortTerm)
			eqPtr(t, "max true peak", l.MaxTruePeakDBTP, &tt.truePeak)
			if l.ToleranceLU != tt.tolerance {
				t.Errorf("tolerance = %v, want %v", l.ToleranceLU, tt.tolerance)
			}
			if l.MaxMomentaryLUFS != nil || l.MinLRALU != nil || l.MaxLRALU != nil {
				t.Errorf("no built-in source gives momentary or LRA limits, got %+v", l)
			}
			if src := s.LimitSources["integrated"]; !strings.Contains(src, tt.marker) {
				t.Errorf("integrated source %q lacks marker %q", src, tt.marker)
			}
			if src := s.LimitSources["true_peak"]; !strings.Contains(src, tt.truePeakMarker) {
				t.Errorf("true-peak source %q lacks marker %q", src, tt.truePeakMarker)
			}
			if s.Source.Document == "" || s.Source.Marker == "" || s.Title == "" {
				t.Errorf("source or title missing: %+v", s.Source)
			}
		})
	}
}

func eqPtr(t *testing.T, what string, got, want *float64) {
	t.Helper()
	switch {
	case got == nil && want == nil:
	case got == nil || want == nil:
		t.Errorf("%s = %v, want %v", what, deref(got), deref(want))
	case *got != *want:
		t.Errorf("%s = %v, want %v", what, *got, *want)
	}
}

func deref(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

func TestLookup(t *testing.T) {
	s, err := Lookup(" EBU-R128 ")
	if err != nil || s.ID != "ebu-r128" {
		t.Fatalf("Lookup with case and spaces = %v, %v", s, err)
	}
	_, err = Lookup("ebu-r129")
	var unknown *UnknownSpecError
	if !errors.As(err, &unknown) {
		t.Fatalf("Lookup(unknown) error = %v, want *UnknownSpecError", err)
	}
	for _, id := range BuiltinIDs() {
		if !strings.Contains(err.Error(), id) {
			t.Errorf("error %q does not list %q", err, id)
		}
	}
}

func TestBuiltinCopiesAreIndependent(t *testing.T) {
	a := mustLookup(t, "ebu-r128")
	*a.Loudness.TargetLUFS = 0
	a.LimitSources["integrated"] = "changed"
	b := mustLookup(t, "ebu-r128")
	if *b.Loudness.TargetLUFS != -23 || b.LimitSources["integrated"] == "changed" {
		t.Fatal("changing one copy of a built-in spec changed the next")
	}
	c := b.Clone()
	*c.Loudness.MaxTruePeakDBTP = 0
	if *b.Loudness.MaxTruePeakDBTP != -1 {
		t.Fatal("Clone shares limits with the original")
	}
}
