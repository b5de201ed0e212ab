package engine_test

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// ExampleJudge judges a line-up tone delivered to an invented outlet whose
// folder carries a kweigh.toml extending EBU R 128. A 997 Hz sine at
// -23 dBFS on both channels reads -23.0 LUFS (EBU Tech 3341 minimum
// requirement signal 1, from memory; the project's loudness tests confirm
// it), so loudness and true peak pass; the same signal on both channels is
// dual mono delivered as stereo, which R 128 sets no limit for, so kweigh's
// own QC check only warns. (Lower your monitors before playing any line-up
// tone.)
func ExampleJudge() {
	dir, _ := os.MkdirTemp("", "engine-example")
	defer os.RemoveAll(dir)
	outlet := filepath.Join(dir, "lanternfish-fm")
	os.MkdirAll(filepath.Join(outlet, "week-48"), 0o755)
	os.WriteFile(filepath.Join(outlet, "kweigh.toml"), []byte("name = \"lanternfish-fm\"\nextends = \"ebu-r128\"\n"), 0o644)
	file := filepath.Join(outlet, "week-48", "line-up.wav")
	a := audiotest.DBFS(-23)
	os.WriteFile(file, audiotest.PCMWAV(48000, 2, 24, audiotest.Sine(48000, 10, 997, a, a)), 0o644)

	rec := engine.Judge(context.Background(), file, engine.Options{})
	fmt.Printf("spec %s (from %s)\n", rec.Spec.ID, filepath.Base(filepath.Dir(rec.SpecFile)))
	fmt.Printf("verdict %s, integrated %.1f LUFS\n", rec.Result.Verdict, *rec.Measurement.IntegratedLUFS)
	for _, c := range rec.Result.Checks {
		if c.ID == "integrated" || c.ID == "true_peak" || c.Verdict != "pass" {
			fmt.Println(c.ID, c.Verdict)
		}
	}
	// Output:
	// spec lanternfish-fm (from lanternfish-fm)
	// verdict warn, integrated -23.0 LUFS
	// integrated pass
	// true_peak pass
	// dual_mono warn
}

// ExampleRun collects a folder and measures its files on two workers,
// emitting them in folder order however the work is scheduled.
func ExampleRun() {
	dir, _ := os.MkdirTemp("", "engine-example")
	defer os.RemoveAll(dir)
	for i, db := range []float64{-20, -30, -26} {
		a := audiotest.DBFS(db)
		name := filepath.Join(dir, fmt.Sprintf("take-%d.wav", i+1))
		os.WriteFile(name, audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 3, 997, a, a)), 0o644)
	}
	os.WriteFile(filepath.Join(dir, "running-order.txt"), []byte("1. cold open\n"), 0o644)

	targets, err := engine.Collect([]string{dir})
	if err != nil {
		fmt.Println(err)
		return
	}
	opt := engine.Options{MeasureOnly: true}
	engine.Run(context.Background(), targets, 2,
		func(ctx context.Context, t engine.Target) engine.Record { return engine.JudgeTarget(ctx, t, opt) },
		func(i int, r engine.Record) {
			name := filepath.Base(r.Target.Path)
			if r.Skipped {
				fmt.Printf("%d %s: skipped, not audio\n", i, name)
				return
			}
			fmt.Printf("%d %s: %.1f LUFS\n", i, name, *r.Measurement.IntegratedLUFS)
		}, true)
	// Output:
	// 0 running-order.txt: skipped, not audio
	// 1 take-1.wav: -20.0 LUFS
	// 2 take-2.wav: -30.0 LUFS
	// 3 take-3.wav: -26.0 LUFS
}

// ExampleFindSpec shows the search for a file's spec: the nearest
// kweigh.toml from the file's folder upwards, here two folders up.
func ExampleFindSpec() {
	dir, _ := os.MkdirTemp("", "engine-example")
	defer os.RemoveAll(dir)
	os.MkdirAll(filepath.Join(dir, "reedbank-audio", "season-2", "week-07"), 0o755)
	os.WriteFile(filepath.Join(dir, "reedbank-audio", "kweigh.toml"), []byte("name = \"reedbank-audio\"\nextends = \"podcast\"\n"), 0o644)

	spec, file, err := engine.FindSpec(filepath.Join(dir, "reedbank-audio", "season-2", "week-07", "ep-31.mp3"))
	if err != nil {
		fmt.Println(err)
		return
	}
	rel, _ := filepath.Rel(dir, file)
	fmt.Println(spec.ID, "from", filepath.ToSlash(rel), "extends", spec.Extends)
	// Output:
	// reedbank-audio from reedbank-audio/kweigh.toml extends podcast
}

// ExampleJudgeStream judges audio that is not a file on disk (an upload
// already in memory) against a spec given in the options. A 997 Hz sine at
// -16 dBFS left and -22.0 dBFS right reads 10·log10((10^-1.6 + 10^-2.2)/2)
// = -18.0 LUFS (BS.1770: a -23 dBFS 997 Hz stereo tone reads -23.0 LUFS, so
// each channel adds its mean square with the same weight), 5.0 LU above
// R 128's -23 LUFS target.
func ExampleJudgeStream() {
	a := audiotest.DBFS(-16)
	upload := audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 5, 997, a, 0.5*a))
	d, err := decode.New(bytes.NewReader(upload))
	if err != nil {
		fmt.Println(err)
		return
	}
	spec, _ := engine.LoadSpec("ebu-r128")
	rec := engine.JudgeStream(context.Background(), "upload-7731.wav", d, engine.Options{Spec: spec})
	fmt.Printf("%s: %s, integrated %.1f LUFS, gain %+.1f dB\n", rec.Measurement.Path, rec.Result.Verdict,
		*rec.Measurement.IntegratedLUFS, *rec.Result.SuggestedGainDB)
	// Output:
	// upload-7731.wav: fail, integrated -18.0 LUFS, gain -5.0 dB
}
