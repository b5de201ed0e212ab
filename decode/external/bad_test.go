package external_test

import (
	"bytes"
	"context"
	"errors"
	"os"
	ossignal "os/signal"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/external"
	"github.com/kweigh/kweigh/measure"
)

// TestBadInput: broken containers give a clear error or a damaged mark
// naming the file, in bounded time, and leave no child behind.
func TestBadInput(t *testing.T) {
	f := fixtures(t)
	faststart := f.make(t, "fast.m4a", "-i", f.stereo, "-c:a", "aac", "-aac_pns", "0", "-movflags", "+faststart")
	plain := f.make(t, "plain.m4a", "-i", f.stereo, "-c:a", "aac", "-aac_pns", "0")
	mxf := f.mxf8(t)
	cut := func(src, name string, frac float64) string {
		b, err := os.ReadFile(src)
		if err != nil {
			t.Fatal(err)
		}
		p := f.path(name)
		os.WriteFile(p, b[:int(float64(len(b))*frac)], 0o644)
		return p
	}
	// An MXF whose index table segments are overwritten with junk (the
	// index table segment key, SMPTE ST 377-1 section 11.2:
	// 06.0E.2B.34.02.53.01.01.0D.01.02.01.01.10.01.00).
	brokenIndex := func() string {
		b, _ := os.ReadFile(mxf)
		key := []byte{0x06, 0x0E, 0x2B, 0x34, 0x02, 0x53, 0x01, 0x01, 0x0D, 0x01, 0x02, 0x01, 0x01, 0x10, 0x01, 0x00}
		n := 0
		for i := bytes.Index(b, key); i >= 0; {
			for j := i + 16; j < min(len(b), i+16+200); j++ {
				b[j] = 0xA5
			}
			n++
			next := bytes.Index(b[i+16:], key)
			if next < 0 {
				break
			}
			i += 16 + next
		}
		if n == 0 {
			t.Fatal("the MXF fixture has no index table segment to break")
		}
		p := f.path("broken-index.mxf")
		os.WriteFile(p, b, 0o644)
		return p
	}()
	// A video file without audio: black frames coded as MPEG-4 Part 2.
	video := f.path("black.yuv")
	f.mxf8(t) // writes black.yuv
	noAudio := f.make(t, "video-only.mp4", "-f", "rawvideo", "-pix_fmt", "yuv420p", "-s", "64x64", "-r", "25", "-i", video, "-c:v", "mpeg4")
	// 80 mono streams of one source in Matroska: 80 channels, more than
	// one measurement takes.
	args := []string{"-i", f.monos[0]}
	for range 80 {
		args = append(args, "-map", "0:a")
	}
	many := f.make(t, "many.mka", append(args, "-c:a", "pcm_s16le")...)

	cases := []struct {
		name, file string
		wantErr    string // in Error; "" when the file must read as damaged or right
		damaged    bool
	}{
		{"truncated M4A, index at the end", cut(plain, "cut-plain.m4a", 0.5), "ffprobe cannot read it", false},
		{"truncated M4A, index first", cut(faststart, "cut-fast.m4a", 0.5), "", true},
		{"MXF with a broken index", brokenIndex, "", false},
		{"video without audio", noAudio, "no audio stream: it has only 1 video stream(s)", false},
		{"80 audio streams", many, "at most 64 channels at once: choose one stream with --stream N", false},
	}
	src := measure.File(context.Background(), f.mono8, measure.Options{})
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			start := time.Now()
			m := measure.File(context.Background(), tc.file, measure.Options{})
			if time.Since(start) > 20*time.Second {
				t.Errorf("took %v", time.Since(start))
			}
			switch {
			case tc.wantErr != "":
				if m.Err == nil || !strings.Contains(m.Error, tc.wantErr) || !strings.HasPrefix(m.Error, tc.file) {
					t.Errorf("error %q, want one naming the file and saying %q", m.Error, tc.wantErr)
				}
				if errors.Is(m.Err, decode.ErrUnknownFormat) {
					t.Error("a recognised container reported as not audio")
				}
			case tc.damaged:
				if m.Err != nil || m.Damaged == "" || !strings.Contains(m.Damaged, "ffmpeg reported") {
					t.Errorf("error %q, damaged %q: want a damaged mark from ffmpeg's report", m.Error, m.Damaged)
				}
				if m.DurationS <= 0 || m.DurationS >= fixtureSeconds {
					t.Errorf("%.3f s decoded before the damage; want part of the %d s", m.DurationS, fixtureSeconds)
				}
			default:
				// Either refused or marked, or read right: never a silently wrong number.
				if m.Err == nil && m.Damaged == "" {
					if m.IntegratedLUFS == nil || *m.IntegratedLUFS-*src.IntegratedLUFS > 0.001 || *src.IntegratedLUFS-*m.IntegratedLUFS > 0.001 || m.DurationS != src.DurationS {
						t.Errorf("read without complaint but measures %v LUFS over %.3f s; the source %v over %.3f s",
							deref(m.IntegratedLUFS), m.DurationS, *src.IntegratedLUFS, src.DurationS)
					}
				}
			}
		})
	}
	// --stream picks one stream of the 80.
	m := measure.File(context.Background(), many, measure.Options{Decode: decode.Options{Stream: 3}})
	if m.Err != nil || m.Channels != 1 || !strings.Contains(strings.Join(m.Notes, ";"), "audio stream 3 of 80") {
		t.Errorf("--stream 3: error %v, %d channels, notes %q", m.Err, m.Channels, m.Notes)
	}
	m = measure.File(context.Background(), many, measure.Options{Decode: decode.Options{Stream: 81}})
	if m.Err == nil || !strings.Contains(m.Error, "80 audio stream") {
		t.Errorf("--stream 81: error %q", m.Error)
	}
	noChildren(t)
}

func deref(p *float64) float64 {
	if p == nil {
		return -999
	}
	return *p
}

// TestWithoutFFmpeg: a recognised container with no ffmpeg names the format
// and the fix, and is never "not audio".
func TestWithoutFFmpeg(t *testing.T) {
	f := fixtures(t)
	file := f.make(t, "alac.m4a", "-i", f.stereo, "-c:a", "alac")
	for _, opt := range []decode.Options{{FFmpeg: filepath.Join(t.TempDir(), "ffmpeg")}, {FFmpeg: "no-such-ffmpeg-here"}} {
		m := measure.File(context.Background(), file, measure.Options{Decode: opt})
		var miss *external.MissingError
		if !errors.As(m.Err, &miss) || errors.Is(m.Err, decode.ErrUnknownFormat) {
			t.Fatalf("error %v: want a MissingError", m.Err)
		}
		for _, want := range []string{file, "MP4/M4A", "apt-get install ffmpeg", "--ffmpeg"} {
			if !strings.Contains(m.Error, want) {
				t.Errorf("error %q does not say %q", m.Error, want)
			}
		}
	}
	// The environment variable is honoured when the option is empty.
	t.Setenv(external.EnvFFmpeg, "/nonexistent/ffmpeg")
	if m := measure.File(context.Background(), file, measure.Options{}); !strings.Contains(m.Error, "/nonexistent/ffmpeg") {
		t.Errorf("with %s set: error %q", external.EnvFFmpeg, m.Error)
	}
}

// stallingFFmpeg writes an ffmpeg that answers -version and -layouts like
// the real one and then hangs on decoding (a stand-in for a decoder stuck
// on a bad file), with the real ffprobe beside it.
func stallingFFmpeg(t *testing.T) string { return standIn(t, "sleep 30") }

// standIn writes an ffmpeg that answers -version and -layouts like the
// real one and runs then instead of decoding, with the real ffprobe beside
// it.
func standIn(t *testing.T, then string) string {
	dir := t.TempDir()
	script := "#!/bin/sh\ncase \"$*\" in *-version*|*-layouts*) exec " + tool(t, "ffmpeg") + " \"$@\";; esac\n" + then + "\n"
	if err := os.WriteFile(filepath.Join(dir, "ffmpeg"), []byte(script), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(tool(t, "ffprobe"), filepath.Join(dir, "ffprobe")); err != nil {
		t.Fatal(err)
	}
	return filepath.Join(dir, "ffmpeg")
}

// TestChildTimeout: a child that produces nothing is stopped after the
// timeout and the file is reported as stalled; no process is left.
func TestChildTimeout(t *testing.T) {
	f := fixtures(t)
	file := f.make(t, "alac.m4a", "-i", f.stereo, "-c:a", "alac")
	start := time.Now()
	m := measure.File(context.Background(), file, measure.Options{Decode: decode.Options{FFmpeg: stallingFFmpeg(t), ChildTimeout: 3 * time.Second}})
	if took := time.Since(start); took > 15*time.Second {
		t.Errorf("took %v with a 3 s timeout", took)
	}
	if !strings.Contains(m.Damaged, "stalled") {
		t.Errorf("error %q damaged %q: want a stalled decoder", m.Error, m.Damaged)
	}
	noChildren(t)
}

// TestSilentFFmpeg: an ffmpeg that exits cleanly without any audio, for a
// stream ffprobe says has some, is a damaged read, never a 0 s measurement.
func TestSilentFFmpeg(t *testing.T) {
	f := fixtures(t)
	file := f.make(t, "alac.m4a", "-i", f.stereo, "-c:a", "alac")
	m := measure.File(context.Background(), file, measure.Options{Decode: decode.Options{FFmpeg: standIn(t, "exit 0")}})
	if !strings.Contains(m.Damaged, "decoded no audio") {
		t.Errorf("error %q damaged %q", m.Error, m.Damaged)
	}
	noChildren(t)
}

// TestCancelStopsChild: a cancelled measurement (here by a real SIGINT to
// this process, caught the way kweigh catches it) stops and reaps ffmpeg
// while it is still decoding.
func TestCancelStopsChild(t *testing.T) {
	f := fixtures(t)
	// 3 minutes of audio (the 60 s signal read three times over by
	// ffmpeg's -stream_loop input option): long enough that the real
	// ffmpeg is still decoding when the signal comes.
	file := f.make(t, "long.m4a", "-stream_loop", "2", "-i", f.long(t), "-c:a", "alac")

	d, err := decode.OpenWith(file, decode.Options{})
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]float64, 4096*2)
	if _, err := d.ReadFrames(buf); err != nil {
		t.Fatal(err)
	}
	if live, _ := children(t); len(live) != 1 {
		t.Fatalf("want one running ffmpeg, have %v", live)
	}
	d.Close()
	noChildren(t)

	ctx, stop := ossignal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	done := make(chan *measure.Measurement)
	go func() { done <- measure.File(ctx, file, measure.Options{}) }()
	// Wait until ffmpeg (not ffprobe) is decoding, then interrupt.
	for deadline := time.Now().Add(20 * time.Second); !ffmpegRunning(); time.Sleep(10 * time.Millisecond) {
		if time.Now().After(deadline) {
			t.Fatal("ffmpeg never started")
		}
	}
	syscall.Kill(os.Getpid(), syscall.SIGINT)
	select {
	case m := <-done:
		if !errors.Is(m.Err, context.Canceled) {
			t.Errorf("error %v, want the cancellation", m.Err)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("measurement did not stop after SIGINT")
	}
	noChildren(t)
}

// ffmpegRunning reports whether a child of this process named ffmpeg runs.
func ffmpegRunning() bool {
	live, _ := children(nil)
	for _, pid := range live {
		if b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/comm"); err == nil && strings.TrimSpace(string(b)) == "ffmpeg" {
			return true
		}
	}
	return false
}
