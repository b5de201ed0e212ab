package external_test

import (
	"bytes"
	"context"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/measure"
)

// readAll decodes a whole file through the registry.
func readAll(t testing.TB, path string, opt decode.Options) (decode.Info, []float64, error) {
	t.Helper()
	f, err := decode.OpenWith(path, opt)
	if err != nil {
		return decode.Info{}, nil, err
	}
	defer f.Close()
	info := f.Info()
	var all []float64
	buf := make([]float64, 4096*info.Channels)
	for {
		n, err := f.ReadFrames(buf)
		all = append(all, buf[:n*info.Channels]...)
		if err == io.EOF {
			return info, all, nil
		}
		if err != nil {
			return info, all, err
		}
	}
}

// fixtures makes the source WAVs and their lossless and lossy encodings
// once per test binary run.
type fixtureSet struct {
	dir                string
	stereo, six, mono8 string   // sources
	monos              []string // the 8 mono sources of the MXF
	once               sync.Once
}

var fx fixtureSet

// fixtureSeconds is the length of the fixtures' signal: enough for the
// integrated loudness (many 400 ms blocks) and short-term (3 s) values.
const fixtureSeconds = 4

func fixtures(t testing.TB) *fixtureSet {
	t.Helper()
	fx.once.Do(func() {
		dir, err := os.MkdirTemp("", "kweigh-external-")
		if err != nil {
			t.Fatal(err)
		}
		fx.dir = dir
		fx.stereo = filepath.Join(dir, "stereo.wav")
		writeWAV24(t, fx.stereo, 48000, 2, 0, signal(48000, 2, fixtureSeconds))
		fx.six = filepath.Join(dir, "six.wav")
		writeWAV24(t, fx.six, 48000, 6, 0x3F, signal(48000, 6, fixtureSeconds))
		all := signal(48000, 8, fixtureSeconds)
		for c := range 8 {
			mono := make([]float64, len(all)/8)
			for i := range mono {
				mono[i] = all[i*8+c]
			}
			p := filepath.Join(dir, "mono"+string(rune('1'+c))+".wav")
			writeWAV24(t, p, 48000, 1, 0, mono)
			fx.monos = append(fx.monos, p)
		}
		fx.mono8 = filepath.Join(dir, "eight.wav")
		writeWAV24(t, fx.mono8, 48000, 8, 0, all)
	})
	if fx.dir == "" {
		t.Fatal("fixtures could not be made")
	}
	return &fx
}

// long returns 60 s of the stereo signal (made once).
func (f *fixtureSet) long(t testing.TB) string {
	p := f.path("long.wav")
	if _, err := os.Stat(p); err != nil {
		writeWAV24(t, p, 48000, 2, 0, signal(48000, 2, 60))
	}
	return p
}

func (f *fixtureSet) path(name string) string { return filepath.Join(f.dir, name) }

// make encodes name once from the given ffmpeg arguments.
func (f *fixtureSet) make(t testing.TB, name string, args ...string) string {
	t.Helper()
	p := f.path(name)
	if _, err := os.Stat(p); err == nil {
		return p
	}
	encode(t, append(args, p)...)
	return p
}

func (f *fixtureSet) mxf8(t testing.TB) string {
	// ffmpeg's MXF muxer wants a video stream first: the fixtures' length of black
	// 64×64 frames, written raw as planar 4:2:0 and coded as MPEG-2.
	video := f.path("black.yuv")
	frame := make([]byte, 64*64*3/2)
	for i := range frame {
		frame[i] = 16
		if i >= 64*64 {
			frame[i] = 128
		}
	}
	if err := os.WriteFile(video, bytes.Repeat(frame, 25*fixtureSeconds), 0o644); err != nil {
		t.Fatal(err)
	}
	args := []string{"-f", "rawvideo", "-pix_fmt", "yuv420p", "-s", "64x64", "-r", "25", "-i", video}
	for _, m := range f.monos {
		args = append(args, "-i", m)
	}
	args = append(args, "-map", "0:v")
	for i := range f.monos {
		args = append(args, "-map", itoa(i+1)+":a")
	}
	args = append(args, "-c:v", "mpeg2video", "-c:a", "pcm_s24le")
	return f.make(t, "eight-mono.mxf", args...)
}

// rmsDB is the RMS level of channel c of interleaved x in dB.
func rmsDB(x []float64, channels, c int) float64 {
	var sum float64
	n := 0
	for i := c; i < len(x); i += channels {
		sum += x[i] * x[i]
		n++
	}
	return 10 * math.Log10(sum/float64(n))
}

func itoa(i int) string { return strconv.Itoa(i) }

func TestMain(m *testing.M) {
	code := m.Run()
	if fx.dir != "" {
		os.RemoveAll(fx.dir)
	}
	os.Exit(code)
}

// TestLosslessExact: lossless audio through the bridge is the source
// sample for sample (24-bit integers are exact in 32-bit float, IEEE 754).
func TestLosslessExact(t *testing.T) {
	f := fixtures(t)
	cases := []struct {
		name, file, source string
		container          string
		layout             string
	}{
		{"ALAC in M4A", f.make(t, "alac.m4a", "-i", f.stereo, "-c:a", "alac"), f.stereo, "mp4", "L,R"},
		{"PCM in MOV", f.make(t, "pcm.mov", "-i", f.stereo, "-c:a", "pcm_s24le"), f.stereo, "mov", "L,R"},
		{"PCM in MXF, 8 mono tracks", f.mxf8(t), f.mono8, "mxf", "Ch1,Ch2,Ch3,Ch4,Ch5,Ch6,Ch7,Ch8"},
		{"FLAC 5.1 in Matroska", f.make(t, "six.mka", "-i", f.six, "-c:a", "flac"), f.six, "matroska", "L,R,C,LFE,Ls,Rs"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			info, got, err := readAll(t, tc.file, decode.Options{})
			if err != nil {
				t.Fatal(err)
			}
			_, want, err := readAll(t, tc.source, decode.Options{})
			if err != nil {
				t.Fatal(err)
			}
			if info.Container != tc.container || info.BitsPerSample != 24 || info.BitRate != 0 {
				t.Errorf("info %+v: want container %s, 24 bits, no bit rate", info, tc.container)
			}
			if l := strings.Join(info.Layout, ","); l != tc.layout {
				t.Errorf("layout %s, want %s", l, tc.layout)
			}
			if len(got) != len(want) {
				t.Fatalf("%d samples, source has %d", len(got), len(want))
			}
			for i := range got {
				if got[i] != want[i] {
					t.Fatalf("sample %d (channel %d) = %v, source %v", i, i%info.Channels, got[i], want[i])
				}
			}
		})
	}
	noChildren(t)
}

// TestLossy: a lossy file through the bridge measures like the reference
// decoder's PCM (ffmpeg decoding the same file to a WAV, measured by
// kweigh's WAV reader), and within the codec's own change of the source.
func TestLossy(t *testing.T) {
	f := fixtures(t)
	cases := []struct {
		name, file, source string
		refArgs            []string // decoder options for the reference WAV
		codec, layout      string
		vsRef, vsSource    float64 // LU; the reference is the same PCM, the source differs by the codec's change
	}{
		// Tolerances: vsRef 0.001 LU (the same PCM, float32 rounding only);
		// vsSource 0.2 LU for these bit rates (common practice, no
		// published source: perceptual coders keep programme loudness
		// within a few tenths of a dB at these rates).
		{"AAC-LC stereo", f.make(t, "aac.m4a", "-i", f.stereo, "-c:a", "aac", "-aac_pns", "0", "-b:a", "192k"), f.stereo, nil, "aac LC", "L,R", 0.001, 0.2},
		{"AAC-LC 5.1", f.make(t, "aac51.m4a", "-i", f.six, "-c:a", "aac", "-aac_pns", "0", "-b:a", "384k"), f.six, nil, "aac LC", "L,R,C,LFE,Ls,Rs", 0.001, 0.2},
		{"ADTS AAC", f.make(t, "aac.aac", "-i", f.stereo, "-c:a", "aac", "-aac_pns", "0", "-b:a", "192k"), f.stereo, nil, "aac LC", "L,R", 0.001, 0.2},
		{"AC-3 5.1", f.make(t, "six.ac3", "-i", f.six, "-c:a", "ac3", "-b:a", "448k"), f.six, []string{"-drc_scale", "0"}, "ac3", "L,R,C,LFE,Ls,Rs", 0.001, 0.2},
		{"E-AC-3 5.1", f.make(t, "six.eac3", "-i", f.six, "-c:a", "eac3"), f.six, []string{"-drc_scale", "0"}, "eac3", "L,R,C,LFE,Ls,Rs", 0.001, 0.2},
		{"Vorbis", f.make(t, "vorbis.ogg", "-i", f.stereo, "-c:a", "libvorbis", "-q:a", "6"), f.stereo, nil, "vorbis", "L,R", 0.001, 0.2},
		{"Vorbis 5.1", f.make(t, "vorbis51.ogg", "-i", f.six, "-c:a", "libvorbis", "-q:a", "6"), f.six, nil, "vorbis", "L,R,C,LFE,Ls,Rs", 0.001, 0.2},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ref := tc.file + ".ref.wav"
			encode(t, append(append(tc.refArgs, "-i", tc.file, "-c:a", "pcm_f32le"), ref)...)
			got := measure.File(context.Background(), tc.file, measure.Options{})
			if got.Err != nil || got.Damaged != "" {
				t.Fatalf("%v %s", got.Err, got.Damaged)
			}
			want := measure.File(context.Background(), ref, measure.Options{})
			src := measure.File(context.Background(), tc.source, measure.Options{})
			if got.Codec != tc.codec || got.BitsPerSample != 0 || got.BitRateKbps <= 0 {
				t.Errorf("codec %q, %v bits, %v kbps: want %q, no bit depth, a bit rate", got.Codec, got.BitsPerSample, got.BitRateKbps, tc.codec)
			}
			if l := strings.Join(got.ChannelLayout, ","); l != tc.layout {
				t.Errorf("layout %s, want %s", l, tc.layout)
			}
			gi, wi, si := *got.IntegratedLUFS, *want.IntegratedLUFS, *src.IntegratedLUFS
			if math.Abs(gi-wi) > tc.vsRef {
				t.Errorf("integrated %.4f LUFS, reference decoder's PCM %.4f", gi, wi)
			}
			if math.Abs(gi-si) > tc.vsSource {
				t.Errorf("integrated %.4f LUFS, source %.4f", gi, si)
			}
			if math.Abs(got.DurationS-want.DurationS) > 1e-9 {
				t.Errorf("duration %.6f s, reference %.6f s", got.DurationS, want.DurationS)
			}
			// Channel order: each channel's RMS level matches the source's
			// channel at the same position (channels differ by 1.6 dB or
			// more; the LFE channel is band-limited by the encoder and
			// skipped). Tolerance 0.5 dB (common practice, no published
			// source).
			info, dec, err := readAll(t, tc.file, decode.Options{})
			if err != nil {
				t.Fatal(err)
			}
			_, orig, _ := readAll(t, tc.source, decode.Options{})
			for c, label := range info.Layout {
				if label == decode.LowFrequency {
					continue
				}
				g, s := rmsDB(dec, info.Channels, c), rmsDB(orig, info.Channels, c)
				if math.Abs(g-s) > 0.5 {
					t.Errorf("channel %d (%s) at %.2f dB RMS, source channel %d at %.2f (channel order?)", c, label, g, c, s)
				}
			}
		})
	}
	noChildren(t)
}
