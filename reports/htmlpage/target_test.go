package htmlpage

import (
	"math"
	"regexp"
	"testing"

	"github.com/kweigh/kweigh/rules"
)

// TestTargetFor maps built-in and TOML specs to the drawn target.
func TestTargetFor(t *testing.T) {
	nan := math.NaN() // "not drawn"
	builtin := func(id string) *rules.Spec {
		s, err := rules.Lookup(id)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	const tol = 1e-9
	cases := []struct {
		name                 string
		spec                 *rules.Spec
		channels             int
		target, band, ceilng float64
	}{
		// EBU R 128 v4.0 (2020): -23.0 LUFS ±1.0 LU, -1 dBTP (SOURCES.md §4).
		{"ebu-r128 stereo", builtin("ebu-r128"), 2, -23, 1, -1},
		// Podcast practice: -16 LUFS stereo, -19 LUFS mono, ±1 LU, -1 dBTP
		// (SOURCES.md §4: common practice, no published source).
		{"podcast stereo", builtin("podcast"), 2, -16, 1, -1},
		{"podcast mono", builtin("podcast"), 1, -19, 1, -1},
		// AES TD1004 (2015): -20 to -16 LUFS window, drawn as its middle
		// -18 ±2; -1 dBTP [memory] (SOURCES.md §4).
		{"aes-td1004 window", builtin("aes-td1004"), 2, -18, 2, -1},
		// The demo house spec: EBU R 128 figures (SOURCES.md §4).
		{"northwind TOML", northwindSpec(t), 6, -23, 1, -1},
		{"no spec", nil, 2, nan, nan, nan},
	}
	for _, c := range cases {
		got := TargetFor(c.spec, c.channels)
		for _, f := range []struct {
			what string
			got  *float64
			want float64
		}{
			{"integrated target", got.IntegratedLUFS, c.target},
			{"tolerance", got.ToleranceLU, c.band},
			{"true-peak ceiling", got.TruePeakCeilingDBTP, c.ceilng},
		} {
			switch {
			case math.IsNaN(f.want) && f.got != nil:
				t.Errorf("%s: %s is %v, want none", c.name, f.what, *f.got)
			case !math.IsNaN(f.want) && (f.got == nil || math.Abs(*f.got-f.want) > tol):
				t.Errorf("%s: %s is %v, want %v", c.name, f.what, deref(f.got), f.want)
			}
		}
	}

	// A window open on one side has no middle: no band is drawn.
	open, err := rules.Parse("open.toml", []byte("name = \"open\"\n[loudness]\nmax_integrated_lufs = -16.0\n"))
	if err != nil {
		t.Fatal(err)
	}
	if got := TargetFor(open, 2); got.IntegratedLUFS != nil || got.ToleranceLU != nil || got.TruePeakCeilingDBTP != nil {
		t.Errorf("one-sided window: got %+v, want nothing drawn", got)
	}
}

func deref(p *float64) any {
	if p == nil {
		return "none"
	}
	return *p
}

// axisLabel matches the plot's rotated level-axis label.
var axisLabel = regexp.MustCompile(`<text [^>]*transform="rotate\(-90[^>]*>([^<]*)</text>`)

// TestLevelAxisLabel: loudness and peaks have panes and axes of their
// own: the loudness axis in the spec's unit, the peak axis in dBTP, with or
// without a ceiling.
func TestLevelAxisLabel(t *testing.T) {
	for _, tc := range []struct {
		name      string
		page      Page
		want      string
		wantPlots int
	}{
		{"check run with a ceiling", demoPage(t), "loudness: LUFS", 4},
		{"measure run without a ceiling", measurePage(t), "loudness: LUFS", 2},
	} {
		plots := 0
		for _, e := range tc.page.Entries {
			if e.Result.Error != "" {
				continue
			}
			plots++
			m := axisLabel.FindAllStringSubmatch(loudnessPlot(e, "t-", true), -1)
			if len(m) != 2 || m[0][1] != "peak: dBTP" || m[1][1] != tc.want {
				t.Errorf("%s: %s: axis labels %q, want %q and peak: dBTP", tc.name, e.Result.Path, m, tc.want)
			}
		}
		if plots != tc.wantPlots {
			t.Errorf("%s: %d plots, want %d", tc.name, plots, tc.wantPlots)
		}
	}
}
