package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// burstWAV is 20 s of stereo tone at −30 dBFS with a 20 ms burst at
// −0.9 dBFS from 12.34 s (the planted position).
func burstWAV() []byte {
	const rate = 48000
	v := audiotest.Sine(rate, 20, 997, audiotest.DBFS(-30), audiotest.DBFS(-30))
	loud := audiotest.Sine(rate, 20, 997, 0.9, 0.9)
	for i := int(12.34 * rate); i < int(12.36*rate); i++ {
		v[2*i], v[2*i+1] = loud[2*i], loud[2*i+1]
	}
	return audiotest.PCMWAV(rate, 2, 24, v)
}

// TestQCOptions: --start-timecode and --fps stamp the JSON and the
// events, --markers writes every event as a CSV marker list, --groups
// measures groups, and malformed values are usage errors naming the
// option.
func TestQCOptions(t *testing.T) {
	dir := t.TempDir()
	audio := writeTestFile(t, dir, "in/burst.wav", burstWAV())
	markers := filepath.Join(dir, "markers.csv")
	code, out, errOut := kweigh(t, "check", "--spec", "ebu-r128", "--format", "json", "--start-timecode", "10:00:00:00",
		"--markers", markers, "--groups", "each", audio)
	if code != exitFailed {
		t.Fatalf("exit %d: %s\n%s", code, errOut, out)
	}
	var doc struct {
		Files []struct {
			StartTimecode string `json:"start_timecode"`
			FPS           string `json:"fps"`
			Events        []struct {
				Kind          string  `json:"kind"`
				StartS        float64 `json:"start_s"`
				StartTimecode string  `json:"start_timecode"`
			} `json:"events"`
			Groups []struct {
				Name     string `json:"name"`
				Channels []int  `json:"channels"`
				Verdict  string `json:"verdict"`
			} `json:"groups"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Files) != 1 {
		t.Fatalf("%v: %s", err, out)
	}
	f := doc.Files[0]
	if f.StartTimecode != "10:00:00:00" || f.FPS != "25" || len(f.Groups) != 2 || f.Groups[1].Channels[0] != 2 {
		t.Errorf("start %q fps %q groups %+v", f.StartTimecode, f.FPS, f.Groups)
	}
	found := false
	for _, e := range f.Events {
		if e.Kind == "true_peak_over" && e.StartS == 12.3 && e.StartTimecode == "10:00:12:07" {
			found = true
		}
	}
	if !found {
		t.Errorf("no true-peak event at 12.3 s: %+v", f.Events)
	}

	data, err := os.ReadFile(markers)
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(strings.NewReader(string(data))).ReadAll()
	if err != nil || len(rows) < 2 || strings.Join(rows[0], ",") != "file,name,start,end,start_timecode,end_timecode,description" {
		t.Fatalf("markers %v: %q", err, data)
	}
	var burst []string
	for _, r := range rows[1:] {
		if r[1] == "true-peak over" {
			burst = r
		}
	}
	if burst == nil || burst[2] != "0:00:12.300" || burst[3] != "0:00:12.400" || burst[4] != "10:00:12:07" {
		t.Errorf("marker rows %q", rows)
	}

	for _, bad := range []struct{ flag, value, want string }{
		{"--start-timecode", "10:00:00:25", "--start-timecode"},
		{"--fps", "26", "--fps"},
		{"--groups", "main=3-1", "runs backwards"},
		{"--paper", "a3", "--paper"},
	} {
		code, _, errOut := kweigh(t, "measure", bad.flag, bad.value, audio)
		if code != exitTrouble || !strings.Contains(errOut, bad.want) {
			t.Errorf("%s %s: exit %d, %q", bad.flag, bad.value, code, errOut)
		}
	}
}

// TestGroupsByStream: --groups naming audio streams on a MOV delivery with
// a 5.1 stream and a stereo stream: the JSON shows each group's file
// channels and streams; a stream the file lacks is that file's error
// naming the stream, and a malformed stream list a usage error.
func TestGroupsByStream(t *testing.T) {
	ffmpeg, err := exec.LookPath("ffmpeg")
	if err != nil {
		t.Fatalf("this test needs ffmpeg (run bash .ci/setup): %v", err)
	}
	dir := t.TempDir()
	a, b := audiotest.DBFS(-26), audiotest.DBFS(-20)
	six := writeTestFile(t, dir, "six.wav", audiotest.PCMWAV(48000, 6, 24, audiotest.Sine(48000, 4, 997, a, a, a, 0, a, a)))
	two := writeTestFile(t, dir, "two.wav", audiotest.PCMWAV(48000, 2, 24, audiotest.Sine(48000, 4, 997, b, b)))
	mov := filepath.Join(dir, "delivery.mov")
	if out, err := exec.Command(ffmpeg, "-nostdin", "-v", "error", "-i", six, "-i", two, "-map", "0:a", "-map", "1:a", "-c:a", "pcm_s24le", mov).CombinedOutput(); err != nil {
		t.Fatalf("ffmpeg: %v\n%s", err, out)
	}
	code, out, errOut := kweigh(t, "measure", "--format", "json", "--groups", "main=s1:5.1,stereo=s2", mov)
	if code != 0 {
		t.Fatalf("exit %d: %s\n%s", code, errOut, out)
	}
	var doc struct {
		Files []struct {
			Channels int `json:"channels"`
			Groups   []struct {
				Name     string   `json:"name"`
				Channels []int    `json:"channels"`
				Streams  []int    `json:"streams"`
				Layout   []string `json:"channel_layout"`
			} `json:"groups"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Files) != 1 || len(doc.Files[0].Groups) != 2 {
		t.Fatalf("%v: %s", err, out)
	}
	g := doc.Files[0].Groups
	if fmt.Sprint(g[0].Channels, g[0].Streams, g[1].Channels, g[1].Streams, g[1].Layout) != "[1 2 3 4 5 6] [1] [7 8] [2] [L R]" {
		t.Errorf("groups %+v", g)
	}
	code, out, errOut = kweigh(t, "measure", "--format", "json", "--groups", "dub=s3", mov)
	if code == 0 || !strings.Contains(out+errOut, "names audio stream 3 but the file has 2 audio stream(s)") {
		t.Errorf("missing stream: exit %d, %s %s", code, out, errOut)
	}
	code, _, errOut = kweigh(t, "measure", "--groups", "dub=s0", mov)
	if code != exitTrouble || !strings.Contains(errOut, "streams are numbered from 1") {
		t.Errorf("s0: exit %d, %q", code, errOut)
	}
}
