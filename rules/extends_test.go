package rules

import (
	"strings"
	"testing"
)

// TestExtendsShowsItsOwnNumbers is issue 9's case: a spec that extends
// podcast practice (-16 LUFS stereo, -19 LUFS mono, ±1 LU: common
// practice, no published source) and sets target_lufs = -14 has a mono
// target that follows, 3 LU below (-17), and its description and sources
// speak of its own numbers, naming the line that set each one.
func TestExtendsShowsItsOwnNumbers(t *testing.T) {
	s, err := Parse("louder.toml", []byte("name = \"louder\"\nextends = \"podcast\"\n\n[loudness]\ntarget_lufs = -14\n"))
	if err != nil {
		t.Fatal(err)
	}
	if s.Loudness.MonoTargetLUFS == nil || *s.Loudness.MonoTargetLUFS != -17 {
		t.Fatalf("mono target %v, want -17 (follows -14 at the base's -3 LU)", deref(s.Loudness.MonoTargetLUFS))
	}
	if c := mustCheck(t, Evaluate(s, cleanMono(-17.2, -5)), "integrated"); c.Verdict != Pass || c.Limit != "-17.0 LUFS ±1.0 LU (mono)" {
		t.Errorf("mono file at -17.2: %+v", c)
	}
	var b strings.Builder
	if err := s.Describe(&b); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, stale := range []string{"-16 LUFS for stereo", "-19", "-16.0"} {
		if strings.Contains(out, stale) {
			t.Errorf("description shows the parent's %q:\n%s", stale, out)
		}
	}
	for _, want := range []string{
		"Loudness limits: -14.0 LUFS ±1.0 LU (mono -17.0 LUFS), true peak ≤ -1.0 dBTP.",
		"target -14.0 LUFS: user spec louder.toml (louder.toml line 5)",
		"tolerance ±1.0 LU: inherited from podcast, podcast practice [common practice]",
		"mono target -17.0 LUFS: 3.0 LU below the target, as podcast defines it",
		"From podcast: There is no published podcast standard",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("description lacks %q:\n%s", want, out)
		}
	}

	// A mono target set in the file stands on its own.
	s, err = Parse("own.toml", []byte("extends = \"podcast\"\n[loudness]\ntarget_lufs = -14\nmono_target_lufs = -18\n"))
	if err != nil {
		t.Fatal(err)
	}
	if *s.Loudness.MonoTargetLUFS != -18 || s.Loudness.MonoOffsetLU != nil {
		t.Errorf("explicit mono target: %v, offset %v", *s.Loudness.MonoTargetLUFS, deref(s.Loudness.MonoOffsetLU))
	}
	if src := s.LimitSources["integrated"]; !strings.Contains(src, "mono target -18.0 LUFS: user spec own.toml (own.toml line 4)") {
		t.Errorf("source %q", src)
	}
	// A file that extends without touching the target keeps the base's -19.
	s, err = Parse("same.toml", []byte("extends = \"podcast\"\n[timing]\nmax_trailing_silence_s = 3\n"))
	if err != nil {
		t.Fatal(err)
	}
	if *s.Loudness.MonoTargetLUFS != -19 {
		t.Errorf("untouched mono target %v, want -19", *s.Loudness.MonoTargetLUFS)
	}
}
