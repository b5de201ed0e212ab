package main

import (
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestFFmpegFlags: --ffmpeg reaches the bridge (a missing program is named,
// with the fix), and --stream selects a stream.
func TestFFmpegFlags(t *testing.T) {
	ffmpeg, err := exec.LookPath("ffmpeg")
	if err != nil {
		t.Fatalf("this test needs ffmpeg (run bash .ci/setup): %v", err)
	}
	dir := t.TempDir()
	wav := filepath.Join(dir, "tone.wav")
	writeTestWAV(t, wav)
	m4a := filepath.Join(dir, "tone.m4a")
	if out, err := exec.Command(ffmpeg, "-nostdin", "-v", "error", "-i", wav, "-c:a", "alac", m4a).CombinedOutput(); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	code, out, _ := kweigh(t, "measure", "--ffmpeg", filepath.Join(dir, "no-ffmpeg"), m4a)
	if code == 0 || !strings.Contains(out, "apt-get install ffmpeg") || !strings.Contains(out, "no-ffmpeg") {
		t.Errorf("exit %d, output %s", code, out)
	}
	code, out, _ = kweigh(t, "measure", "--ffmpeg", ffmpeg, "--stream", "1", "--format", "json", m4a)
	if code != 0 || !strings.Contains(out, `"codec": "alac"`) || !strings.Contains(out, "audio stream 1 of 1") {
		t.Errorf("exit %d, output %s", code, out)
	}
}

// writeTestWAV writes one second of a 997 Hz tone at −20 dBFS peak as a
// 16-bit stereo WAV.
func writeTestWAV(t *testing.T, path string) {
	const rate = 48000
	data := make([]byte, 0, rate*4)
	for i := range rate {
		v := int16(3277 * sinTurns(997*float64(i)/rate))
		data = append(data, byte(v), byte(v>>8), byte(v), byte(v>>8))
	}
	h := []byte("RIFF\x00\x00\x00\x00WAVEfmt \x10\x00\x00\x00\x01\x00\x02\x00\x80\xbb\x00\x00\x00\xee\x02\x00\x04\x00\x10\x00data")
	n := len(data)
	h = append(h, byte(n), byte(n>>8), byte(n>>16), byte(n>>24))
	size := len(h) - 8 + n
	h[4], h[5], h[6], h[7] = byte(size), byte(size>>8), byte(size>>16), byte(size>>24)
	if err := os.WriteFile(path, append(h, data...), 0o644); err != nil {
		t.Fatal(err)
	}
}

func sinTurns(turns float64) float64 { return math.Sin(2 * math.Pi * turns) }
