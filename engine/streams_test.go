package engine_test

import (
	"bytes"
	"context"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// eightMonoMXF writes an MXF with a short black video stream (ffmpeg's MXF
// muxer wants one first) and one 24-bit PCM mono track per WAV, in order,
// made by ffmpeg as a muxer only (no filter). .ci/setup installs ffmpeg.
func eightMonoMXF(t *testing.T, dir string, monos []string, seconds int) string {
	t.Helper()
	ffmpeg, err := exec.LookPath("ffmpeg")
	if err != nil {
		t.Fatalf("this test needs ffmpeg (run bash .ci/setup): %v", err)
	}
	frame := make([]byte, 64*64*3/2) // planar 4:2:0 black: Y 16, Cb Cr 128
	for i := range frame {
		frame[i] = 16
		if i >= 64*64 {
			frame[i] = 128
		}
	}
	video := writeFile(t, dir, "black.yuv", bytes.Repeat(frame, 25*seconds))
	args := []string{"-nostdin", "-hide_banner", "-v", "error", "-y",
		"-f", "rawvideo", "-pix_fmt", "yuv420p", "-s", "64x64", "-r", "25", "-i", video}
	for _, m := range monos {
		args = append(args, "-i", m)
	}
	args = append(args, "-map", "0:v")
	for i := range monos {
		args = append(args, "-map", strconv.Itoa(i+1)+":a")
	}
	out := filepath.Join(dir, "delivery.mxf")
	args = append(args, "-c:v", "mpeg2video", "-c:a", "pcm_s24le", out)
	if b, err := exec.Command(ffmpeg, args...).CombinedOutput(); err != nil {
		t.Fatalf("ffmpeg %v: %v\n%s", args, err, b)
	}
	return out
}

// TestJudgeStreamGroupsMXF: an MXF delivery with 8 mono tracks, the
// stereo mix on tracks 1–2 and an M&E on 3–8, judged under a spec whose
// groups name streams: the stereo group reads like the same two tracks
// in a stereo WAV (to 0.001 LU / dB: the same samples through the same
// engine) and is judged; the M&E group is far too loud for EBU R 128 but
// measure-only, so it does not fail the file. A group naming a stream the
// file lacks is the file's error, naming the file.
func TestJudgeStreamGroupsMXF(t *testing.T) {
	dir := t.TempDir()
	const seconds = 4
	// Tracks 1–2: a 997 Hz tone at −23 and −24 dBFS (about −23.5 LUFS, BS.1770:
	// a sine reads its RMS level plus 3.01 dB per channel); 3–8: −10 dBFS.
	amps := []float64{audiotest.DBFS(-23), audiotest.DBFS(-24)}
	for range 6 {
		amps = append(amps, audiotest.DBFS(-10))
	}
	var monos []string
	for i, a := range amps {
		monos = append(monos, writeFile(t, dir, "track"+strconv.Itoa(i+1)+".wav", audiotest.PCMWAV(48000, 1, 24, audiotest.Sine(48000, seconds, 997, a))))
	}
	stereo := writeFile(t, dir, "stereo.wav", audiotest.PCMWAV(48000, 2, 24, audiotest.Sine(48000, seconds, 997, amps[0], amps[1])))
	mxf := eightMonoMXF(t, dir, monos, seconds)

	spec, err := rules.Parse("kweigh.toml", []byte(`name = "saltmarsh-mxf"
extends = "ebu-r128"
[[group]]
name = "stereo"
stream = "1-2"
layout = "stereo"
[[group]]
name = "me"
streams = [3, 4, 5, 6, 7, 8]
measure_only = true
`))
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	r := engine.Judge(ctx, mxf, engine.Options{Spec: spec})
	res := r.Result
	if r.Measurement.Error != "" || res == nil || len(res.Groups) != 2 {
		t.Fatalf("error %q, result %+v", r.Measurement.Error, res)
	}
	want := measure.File(ctx, stereo, measure.Options{})
	got := r.Measurement.Groups[0]
	const tol = 0.001
	if !slices.Equal(got.Channels, []int{1, 2}) || !slices.Equal(got.ChannelLayout, want.ChannelLayout) ||
		*got.IntegratedLUFS-*want.IntegratedLUFS > tol || *want.IntegratedLUFS-*got.IntegratedLUFS > tol ||
		*got.TruePeakDBTP-*want.TruePeakDBTP > tol || *want.TruePeakDBTP-*got.TruePeakDBTP > tol {
		t.Errorf("stereo group %v %v: %.4f LUFS %.4f dBTP; stereo WAV %v: %.4f LUFS %.4f dBTP", got.Channels, got.ChannelLayout,
			*got.IntegratedLUFS, *got.TruePeakDBTP, want.ChannelLayout, *want.IntegratedLUFS, *want.TruePeakDBTP)
	}
	sg, me := res.Groups[0], res.Groups[1]
	if sg.MeasureOnly || len(sg.Checks) == 0 || !slices.ContainsFunc(sg.Checks, func(c rules.Check) bool { return c.ID == "integrated" && c.Verdict == rules.Pass }) {
		t.Errorf("stereo group not judged, or its loudness not passed: %+v", sg.Checks)
	}
	if !me.MeasureOnly || len(me.Checks) != 0 || !slices.Equal(me.Channels, []int{3, 4, 5, 6, 7, 8}) || *me.Measurement.IntegratedLUFS < -15 {
		t.Errorf("M&E group: measure only %v, %d checks, channels %v, %.1f LUFS", me.MeasureOnly, len(me.Checks), me.Channels, *me.Measurement.IntegratedLUFS)
	}
	if res.Verdict == rules.Fail || res.Verdict == rules.Error {
		t.Errorf("file verdict %s: the measure-only group decided it (%+v)", res.Verdict, res.Checks)
	}

	bad, err := rules.Parse("kweigh.toml", []byte("extends = \"ebu-r128\"\n[[group]]\nname = \"dub\"\nstream = 9\n"))
	if err != nil {
		t.Fatal(err)
	}
	r = engine.Judge(ctx, mxf, engine.Options{Spec: bad})
	if e := r.Measurement.Error; !strings.Contains(e, mxf) || !strings.Contains(e, `group "dub" names audio stream 9 but the file has 8 audio stream(s)`) {
		t.Errorf("missing stream: error %q", e)
	}
	if r.Verdict() != rules.Error {
		t.Errorf("missing stream: verdict %s", r.Verdict())
	}
}
