package rules

import (
	"errors"
	"slices"
	"strings"
	"testing"
)

// TestHouseSpec loads the invented Harbourlight Radio spec, which extends
// ebu-r128 (EBU R 128 v4.0: -23.0 LUFS [doc], -1 dBTP [desc]) and overrides
// some of its limits.
func TestHouseSpec(t *testing.T) {
	s, err := LoadFile("testdata/house-spec.toml")
	if err != nil {
		t.Fatal(err)
	}
	if s.ID != "harbourlight-radio" || s.Extends != "ebu-r128" || s.File != "testdata/house-spec.toml" {
		t.Errorf("header: id %q extends %q file %q", s.ID, s.Extends, s.File)
	}
	l := s.Loudness
	eqPtr(t, "inherited target", l.TargetLUFS, ptr(-23.0)) // from ebu-r128
	if l.ToleranceLU != 0.5 || l.WarnMarginLU != DefaultWarnMarginLU {
		t.Errorf("tolerance %v margin %v", l.ToleranceLU, l.WarnMarginLU)
	}
	eqPtr(t, "overridden true peak", l.MaxTruePeakDBTP, ptr(-2.0))
	eqPtr(t, "short-term", l.MaxShortTermLUFS, ptr(-16.0))
	eqPtr(t, "max LRA", l.MaxLRALU, ptr(15.0))
	if !l.LRAAdvisory {
		t.Error("lra_advisory not set")
	}
	f := s.Format
	if !slices.Equal(f.Containers, []string{"wav", "bw64"}) || !slices.Equal(f.SampleRatesHz, []int{48000}) ||
		!slices.Equal(f.BitDepths, []int{24}) || len(f.Layouts) != 2 || !slices.Equal(f.Layouts[1], []string{"L", "R"}) {
		t.Errorf("format: %+v", f)
	}
	if *s.Timing.MaxTrailingSilenceS != 3.0 || *s.Signal.MaxClipRuns != 0 || s.Signal.DualMono != PolicyFail || s.Bext.Mismatch != PolicyFail {
		t.Errorf("timing/signal/bext: %+v %+v %+v", s.Timing, s.Signal, s.Bext)
	}
	// Overridden limits name the house document and line; inherited ones
	// keep the base's source.
	if src := s.LimitSources["true_peak"]; src != "Harbourlight Radio technical delivery requirements, issue 3 (2025) (testdata/house-spec.toml line 13)" {
		t.Errorf("true-peak source %q", src)
	}
	if src := s.LimitSources["phase"]; !strings.Contains(src, "line 32") { // min_correlation is on line 32
		t.Errorf("phase source %q", src)
	}
	// A file 0.6 LU above target fails the tighter tolerance but passes ebu-r128.
	if v := Evaluate(s, cleanStereo(-22.4, -3)).Verdict; v != Fail {
		t.Errorf("-22.4 LUFS under ±0.5 LU: %s", v)
	}
	if c := mustCheck(t, Evaluate(mustLookup(t, "ebu-r128"), cleanStereo(-22.4, -3)), "integrated"); c.Verdict != Pass {
		t.Errorf("-22.4 LUFS under ebu-r128: %+v", c)
	}
}

func TestParseWindowOverrides(t *testing.T) {
	// Extending a window spec and moving one bound keeps the other.
	s, err := Parse("outlet.toml", []byte("extends = \"aes-td1004\"\n[loudness]\nmax_integrated_lufs = -17\n"))
	if err != nil {
		t.Fatal(err)
	}
	eqPtr(t, "min", s.Loudness.MinIntegratedLUFS, ptr(-20.0)) // AES TD1004 [desc]
	eqPtr(t, "max", s.Loudness.MaxIntegratedLUFS, ptr(-17.0))
	// A window on a target spec replaces the target.
	s, err = Parse("music.toml", []byte("extends = \"aes-td1008\"\n[loudness]\nmax_integrated_lufs = -16\n"))
	if err != nil {
		t.Fatal(err)
	}
	if s.Loudness.TargetLUFS != nil || s.Integrated() != "≤ -16.0 LUFS" {
		t.Errorf("window over target: %+v", s.Loudness)
	}
	// A target on a window spec replaces the window.
	s, err = Parse("t.toml", []byte("extends = \"aes-td1004\"\n[loudness]\ntarget_lufs = -18\ntolerance_lu = 1\n"))
	if err != nil {
		t.Fatal(err)
	}
	if s.Loudness.MinIntegratedLUFS != nil || s.Integrated() != "-18.0 LUFS ±1.0 LU" {
		t.Errorf("target over window: %+v", s.Loudness)
	}
	// A spec from scratch, integers accepted for numbers, default ID is the file.
	s, err = Parse("deliveries/kweigh.toml", []byte("[loudness]\ntarget_lufs = -24\ntolerance_lu = 2\n"))
	if err != nil {
		t.Fatal(err)
	}
	if s.ID != "deliveries/kweigh.toml" || s.Integrated() != "-24.0 LUFS ±2.0 LU" || s.Loudness.MaxTruePeakDBTP != nil {
		t.Errorf("scratch spec: %q %+v", s.ID, s.Loudness)
	}
}

// TestParseErrors: every bad spec is rejected with file, line and key.
func TestParseErrors(t *testing.T) {
	tests := []struct {
		name    string
		toml    string
		line    int
		key     string
		problem string // substring
	}{
		{"typo'd key", "extends = \"ebu-r128\"\n\n[loudness]\ntarget_lufs = -23\ntolerence_lu = 0.5\n",
			5, "loudness.tolerence_lu", `unknown key "tolerence_lu" (did you mean "tolerance_lu"?)`},
		{"unknown table", "[loundess]\ntarget_lufs = -23\n", 1, "loundess", `unknown table "loundess" (did you mean "loudness"?)`},
		{"unknown top-level key", "name = \"x\"\nextend = \"ebu-r128\"\n", 2, "extend", `did you mean "extends"?`},
		{"negative tolerance", "[loudness]\ntarget_lufs = -23\ntolerance_lu = -1\n", 3, "loudness.tolerance_lu", "must be between 0 and 20 LU, got -1"},
		{"wrong type", "[loudness]\ntarget_lufs = \"-23\"\n", 2, "loudness.target_lufs", `must be a number, got the string "-23" (write numbers without quotes)`},
		{"missing minus", "[loudness]\ntarget_lufs = 23\n", 2, "loudness.target_lufs", "(missing minus sign?)"},
		{"unknown base", "name = \"x\"\nextends = \"ebu-r129\"\n", 2, "extends", `unknown spec "ebu-r129" (built-in specs: ebu-r128, ebu-r128-qc`},
		{"min above max", "[timing]\nmin_duration_s = 60\nmax_duration_s = 30\n", 3, "timing.max_duration_s", "minimum 60 is above maximum 30"},
		{"min above inherited max", "extends = \"aes-td1004\"\n[loudness]\nmin_integrated_lufs = -15\n", 3, "loudness.min_integrated_lufs", "minimum -15 is above maximum -16"},
		{"unknown container", "[format]\ncontainers = [\"wav\", \"ogg\"]\n", 2, "format.containers", `unknown value "ogg" (known: wav, rf64, bw64, flac, mp3, aiff, aifc)`},
		{"unknown layout label", "[format]\nlayouts = [\n  \"stereo\",\n  \"L,R,X\",\n]\n", 2, "format.layouts", `unknown channel label "X"`},
		{"fractional sample rate", "[format]\nsample_rates_hz = [48000.5]\n", 2, "format.sample_rates_hz", "must be a list of whole numbers, but it contains the number 48000.5"},
		{"bad policy", "[signal]\ndual_mono = \"maybe\"\n", 2, "signal.dual_mono", `must be "fail", "warn" or "allow"`},
		{"target and window", "[loudness]\ntarget_lufs = -23\nmax_integrated_lufs = -20\n", 3, "loudness.max_integrated_lufs", "not both"},
		{"tolerance on a window", "extends = \"aes-td1004\"\n[loudness]\ntolerance_lu = 1\n", 3, "loudness.tolerance_lu", "needs target_lufs"},
		{"mono target without target", "[loudness]\nmono_target_lufs = -19\n", 2, "loudness.mono_target_lufs", "needs target_lufs"},
		{"table as a value", "loudness = 5\n", 1, "loudness", "must be a table"},
		{"name with spaces", "name = \"Harbourlight Radio\"\n", 1, "name", "one word"},
		{"not a number", "[loudness]\nmax_true_peak_dbtp = nan\n", 2, "loudness.max_true_peak_dbtp", "finite"},
		{"syntax error", "[loudness]\ntarget_lufs = = -23\n", 2, "", "TOML syntax"},
		{"duplicate key", "[loudness]\ntarget_lufs = -23\ntarget_lufs = -24\n", 3, "", "TOML syntax"},
		{"key after multi-line string", "description = \"\"\"\nlimits:\nfoo = 1\n\"\"\"\n[timing]\nmax_silence_s = 2\n", 6, "timing.max_silence_s", "unknown key"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := Parse("house.toml", []byte(tt.toml))
			if err == nil {
				t.Fatalf("accepted: %+v", s)
			}
			var se *SpecError
			if !errors.As(err, &se) {
				t.Fatalf("error %v (%T) is not a *SpecError", err, err)
			}
			if se.File != "house.toml" || se.Line != tt.line || (tt.key != "" && se.Key != tt.key) || !strings.Contains(se.Problem, tt.problem) {
				t.Errorf("got  %s:%d key %q: %s\nwant %s:%d key %q: …%s…", se.File, se.Line, se.Key, se.Problem, "house.toml", tt.line, tt.key, tt.problem)
			}
			if !strings.HasPrefix(err.Error(), "house.toml:") {
				t.Errorf("message %q does not start with the file name", err)
			}
		})
	}
}

func TestParseReportsEveryProblem(t *testing.T) {
	_, err := Parse("h.toml", []byte("[loudness]\ntaget_lufs = -23\n[signal]\nmin_correlation = 3\n"))
	var all SpecErrors
	if !errors.As(err, &all) || len(all) != 2 || all[0].Line != 2 || all[1].Line != 4 {
		t.Fatalf("got %v", err)
	}
	if want := "h.toml:2: loudness.taget_lufs: unknown key"; !strings.HasPrefix(err.Error(), want) {
		t.Errorf("message %q, want prefix %q", err, want)
	}
}

func TestLoadFileMissing(t *testing.T) {
	if _, err := LoadFile("testdata/no-such-spec.toml"); err == nil || !strings.Contains(err.Error(), "no-such-spec.toml") {
		t.Errorf("missing file: %v", err)
	}
}
