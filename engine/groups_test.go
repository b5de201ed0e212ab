package engine_test

import (
	"context"
	"testing"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/rules"
)

// TestJudgeGroups: a folder spec declaring two groups, one judged against
// a spec file beside it: the file is measured per group, each group
// judged against its spec, and the file's verdict is the worst.
func TestJudgeGroups(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, dir, "kweigh.toml", []byte(`name = "tidewater-4ch"
extends = "ebu-r128"
[[group]]
name = "english"
channels = "1-2"
[[group]]
name = "welsh"
channels = "3-4"
spec = "specs/hot.toml"
`))
	writeFile(t, dir, "specs/hot.toml", []byte("name = \"hot\"\n[loudness]\ntarget_lufs = -16\ntolerance_lu = 1\n"))
	// Channels 1–2 at −23 dBFS (a −23 LUFS stereo 997 Hz tone reads about
	// −23.0 LUFS: the sine reads its RMS level plus 3.01 dB for two
	// channels less 3.01 dB RMS, BS.1770), 3–4 at −16 dBFS. Both pass
	// their loudness; the same tone on both channels of a pair is the QC
	// default's dual-mono warning, so the file warns.
	a, b := audiotest.DBFS(-23), audiotest.DBFS(-16)
	path := writeFile(t, dir, "ep4.wav", audiotest.PCMWAV(48000, 4, 24, audiotest.Sine(48000, 4, 997, a, a, b, b)))
	r := engine.Judge(context.Background(), path, engine.Options{})
	res := r.Result
	if res == nil || len(res.Groups) != 2 {
		t.Fatalf("result %+v", res)
	}
	if res.Groups[0].Spec != "tidewater-4ch" || res.Groups[1].Spec != "hot" ||
		res.Verdict != rules.Warn || res.Groups[1].Checks[0].Verdict != rules.Pass {
		t.Errorf("groups judged against %q and %q, verdict %s (%+v)", res.Groups[0].Spec, res.Groups[1].Spec, res.Verdict, res.Groups[1].Checks)
	}
	// The same file with --groups overriding: both groups against the folder
	// spec, so the hot one fails the file.
	opt := engine.Options{}
	opt.Measure.EachChannel = true
	r = engine.Judge(context.Background(), path, opt)
	if len(r.Result.Groups) != 4 || r.Result.Verdict != rules.Fail {
		t.Errorf("each channel: %d groups, verdict %s", len(r.Result.Groups), r.Result.Verdict)
	}
}
