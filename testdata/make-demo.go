//go:build ignore

// make-demo writes the bundled demo deliveries in testdata/demo: the
// invented production house Kestrel Lane Audio delivering to three invented
// outlets. Every signal is synthesised here from a fixed seed, levelled with
// kweigh's own loudness engine, and written as WAV, or encoded with Debian's
// `flac` and `lame` (apt-get install flac lame).
//
//	go run testdata/make-demo.go
//
// The files are committed, so running the demo needs only Go; rerun this only
// to change them. See testdata/demo/README.md for what each file shows.
package main

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"log"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/loudness"
)

const seconds = 8.0

func main() {
	log.SetFlags(0)
	dir := filepath.Join("testdata", "demo")
	if _, err := os.Stat(filepath.Join("testdata", "make-demo.go")); err != nil {
		log.Fatal("run from the repository root: go run testdata/make-demo.go")
	}
	radio := filepath.Join(dir, "harbourlight-radio")
	pods := filepath.Join(dir, "northgate-podcasts")
	stream := filepath.Join(dir, "quillbrook-stream")
	for _, d := range []string{radio, pods, stream} {
		must(os.MkdirAll(d, 0o755))
	}

	// Harbourlight Radio: broadcast WAV/BWF, 48 kHz 24-bit stereo, house spec.
	ep07 := level(music(48000, 2, 7), -23.0)
	writeWAV(filepath.Join(radio, "tidewater-evenings-ep07.wav"), 48000, 24, ep07, bextFor(ep07, 48000, "Tidewater Evenings ep. 7 - final mix", -1))
	ep08 := level(music(48000, 2, 8), -18.6)
	// Declares the loudness it had before the last bus change: -23.0.
	writeWAV(filepath.Join(radio, "tidewater-evenings-ep08.wav"), 48000, 24, ep08, bextFor(ep08, 48000, "Tidewater Evenings ep. 8 - final mix", -23.0))
	promo := peaky(level(music(48000, 2, 9), -24.0), 48000)
	writeWAV(filepath.Join(radio, "harbour-lights-promo.wav"), 48000, 24, promo, nil)
	ep09 := level(music(44100, 2, 10), -23.0)
	writeWAV(filepath.Join(radio, "tidewater-evenings-ep09.wav"), 44100, 24, ep09, nil)
	ep10 := level(invertRight(speech(48000, 11)), -23.0)
	writeWAV(filepath.Join(radio, "tidewater-evenings-ep10.wav"), 48000, 24, ep10, nil)
	writeCorrupt(filepath.Join(radio, "archive-interview-1987.wav"))

	// Northgate Podcasts: MP3 and FLAC, podcast practice.
	s12 := level(mixStereo(speech(44100, 12), music(44100, 2, 13), 0.25), -16.0)
	encodeMP3(filepath.Join(pods, "lamplighters-almanac-s02e12.mp3"), 44100, s12, "The Lamplighter's Almanac S2E12")
	s13 := level(speech(44100, 14), -16.0) // mono, but levelled to the stereo target
	encodeMP3(filepath.Join(pods, "lamplighters-almanac-s02e13.mp3"), 44100, s13, "The Lamplighter's Almanac S2E13")
	s14 := appendSilence(level(mixStereo(speech(44100, 15), music(44100, 2, 16), 0.2), -16.0), 44100, 6)
	encodeFLAC(filepath.Join(pods, "lamplighters-almanac-s02e14.flac"), 44100, 16, s14)

	// Quillbrook Stream: music streaming, FLAC.
	q3 := level(music(44100, 2, 17), -17.5)
	encodeFLAC(filepath.Join(stream, "quayside-sessions-ep03.flac"), 44100, 16, q3)
	q4 := level(music(44100, 2, 18), -19.9)
	encodeFLAC(filepath.Join(stream, "quayside-sessions-ep04.flac"), 44100, 16, q4)
	log.Printf("demo deliveries written to %s", dir)
}

// signal is a planar multichannel signal.
type signal struct {
	rate int
	ch   [][]float64
}

func newSignal(rate, channels int, secs float64) signal {
	n := int(secs * float64(rate))
	s := signal{rate: rate, ch: make([][]float64, channels)}
	for c := range s.ch {
		s.ch[c] = make([]float64, n)
	}
	return s
}

// speech is a mono voice-like signal: a harmonic source with a wandering
// pitch, shaped by three formant bumps, cut into syllables and phrases.
func speech(rate int, seed uint64) signal {
	rng := rand.New(rand.NewPCG(seed, 1))
	s := newSignal(rate, 1, seconds)
	x := s.ch[0]
	fs := float64(rate)
	formants := []float64{550, 1450, 2600}
	env, target := 0.0, 0.0
	next := 0
	phase := 0.0
	f0 := 120.0 + rng.Float64()*40
	for i := range x {
		if i >= next { // a new syllable or pause
			if rng.Float64() < 0.25 {
				target = 0
				next = i + int(fs*(0.08+rng.Float64()*0.35))
			} else {
				target = 0.6 + 0.4*rng.Float64()
				next = i + int(fs*(0.12+rng.Float64()*0.2))
				f0 = 100 + rng.Float64()*90
			}
		}
		env += (target - env) * 0.002
		phase += 2 * math.Pi * f0 / fs
		v := 0.0
		for k := 1; k <= 24; k++ {
			f := f0 * float64(k)
			if f > fs/2-2000 {
				break
			}
			amp := 0.0
			for j, fm := range formants {
				d := (f - fm) / (120 + 60*float64(j))
				amp += math.Exp(-d*d) / float64(j+1)
			}
			v += (amp + 0.02) * math.Sin(float64(k)*phase)
		}
		v += 0.05 * (rng.Float64()*2 - 1) // breath and fricatives
		x[i] = env * v
	}
	return s
}

// music is a chord progression with a bass line, hi-hat noise and a kick.
func music(rate, channels int, seed uint64) signal {
	rng := rand.New(rand.NewPCG(seed, 2))
	s := newSignal(rate, channels, seconds)
	fs := float64(rate)
	chords := [][]float64{{220, 277.18, 329.63}, {196, 246.94, 293.66}, {174.61, 220, 261.63}, {196, 246.94, 329.63}}
	beat := int(fs * 0.5)
	for i := range s.ch[0] {
		t := float64(i) / fs
		chord := chords[(i/(beat*4))%len(chords)]
		v := 0.0
		for _, f := range chord {
			for h := 1; h <= 5; h++ {
				v += math.Sin(2*math.Pi*f*float64(h)*t) / float64(h*h)
			}
		}
		v *= 0.25 * (1 + 0.1*math.Sin(2*math.Pi*5*t))
		bass := 0.35 * math.Sin(2*math.Pi*chord[0]/2*t)
		pos := i % beat
		kick := 0.0
		if (i/beat)%2 == 0 {
			tt := float64(pos) / fs
			kick = 0.8 * math.Exp(-tt*18) * math.Sin(2*math.Pi*(55+60*math.Exp(-tt*30))*tt)
		}
		hat := 0.0
		if off := (i + beat/2) % (beat / 2); off < int(fs*0.04) {
			hat = 0.15 * (rng.Float64()*2 - 1) * math.Exp(-float64(off)/fs*80)
		}
		for c := range s.ch {
			pan := 1.0
			if c == 1 {
				pan = 0.85
			}
			s.ch[c][i] = pan*v + bass + kick + hat*(1.2-0.4*float64(c))
		}
	}
	return s
}

// mixStereo puts a mono voice in the centre of a stereo bed at bedGain.
func mixStereo(voice, bed signal, bedGain float64) signal {
	out := newSignal(voice.rate, 2, seconds)
	for c := 0; c < 2; c++ {
		for i := range out.ch[c] {
			out.ch[c][i] = voice.ch[0][i] + bedGain*bed.ch[c][i]
		}
	}
	return out
}

// invertRight makes a two-channel signal whose right channel is the left
// one upside down: a wiring fault that cancels in a mono fold-down.
func invertRight(mono signal) signal {
	out := newSignal(mono.rate, 2, seconds)
	for i, v := range mono.ch[0] {
		out.ch[0][i] = v
		out.ch[1][i] = -v
	}
	return out
}

// peaky adds four short, hard percussion hits that push the true peak to
// about full scale while leaving the integrated loudness nearly unchanged.
func peaky(s signal, rate int) signal {
	rng := rand.New(rand.NewPCG(99, 3))
	for k := 0; k < 4; k++ {
		at := int((1.2 + 1.7*float64(k)) * float64(rate))
		for j := 0; j < rate/100; j++ {
			v := 0.985 * math.Exp(-float64(j)/float64(rate)*400) * math.Sin(2*math.Pi*3100*float64(j)/float64(rate)+rng.Float64()*0.1)
			for c := range s.ch {
				s.ch[c][at+j] = v
			}
		}
	}
	return s
}

func appendSilence(s signal, rate int, secs float64) signal {
	n := int(secs * float64(rate))
	for c := range s.ch {
		s.ch[c] = append(s.ch[c], make([]float64, n)...)
	}
	return s
}

// level scales s so that kweigh's engine reads target LUFS.
func level(s signal, target float64) signal {
	got := measure(s)
	g := math.Pow(10, (target-got)/20)
	for c := range s.ch {
		for i := range s.ch[c] {
			s.ch[c][i] *= g
		}
	}
	return s
}

func measure(s signal) float64 {
	w, err := loudness.Weights(decode.DefaultLayout(len(s.ch)))
	must(err)
	m, err := loudness.NewMeter(s.rate, w)
	must(err)
	m.Write(interleave(s))
	r := m.Result()
	if !r.Integrated.Defined {
		log.Fatalf("demo signal has no integrated loudness: %s", r.Integrated.Why)
	}
	return r.Integrated.Value
}

func interleave(s signal) []float64 {
	nc := len(s.ch)
	out := make([]float64, len(s.ch[0])*nc)
	for c := range s.ch {
		for i, v := range s.ch[c] {
			out[i*nc+c] = v
		}
	}
	return out
}

// pcm quantises to signed integers of the given width, little-endian.
func pcm(s signal, bits int) []byte {
	full := math.Ldexp(1, bits-1)
	var b bytes.Buffer
	for _, v := range interleave(s) {
		q := int64(math.Round(v * full))
		q = max(-int64(full), min(int64(full)-1, q))
		switch bits {
		case 16:
			binary.Write(&b, binary.LittleEndian, int16(q))
		case 24:
			b.Write([]byte{byte(q), byte(q >> 8), byte(q >> 16)})
		}
	}
	return b.Bytes()
}

// bextFor builds a BWF bext chunk (EBU Tech 3285 v2). declared, when not
// -1, is written as the loudness value instead of the measured one.
func bextFor(s signal, rate int, description string, declared float64) []byte {
	w, _ := loudness.Weights(decode.DefaultLayout(len(s.ch)))
	m, _ := loudness.NewMeter(rate, w)
	m.Write(interleave(s))
	r := m.Result()
	b := make([]byte, 602)
	copy(b[0:], description)
	copy(b[256:], "Kestrel Lane Audio")
	copy(b[288:], "KLA-TE-2026")
	copy(b[320:], "2026-11-20")
	copy(b[330:], "14:05:00")
	binary.LittleEndian.PutUint16(b[346:], 2)
	lv := r.Integrated.Value
	if declared != -1 {
		lv = declared
	}
	put := func(off int, v float64) { binary.LittleEndian.PutUint16(b[off:], uint16(int16(math.Round(v*100)))) }
	put(412, lv)
	put(414, r.LoudnessRange.Value)
	put(416, loudness.DB(r.MaxTruePeak()))
	put(418, r.MaxMomentary.Value)
	put(420, r.MaxShortTerm.Value)
	return append(b, []byte("A=PCM,F=48000,W=24,M=stereo,T=Kestrel Lane mix bus\r\n")...)
}

func writeWAV(path string, rate, bits int, s signal, bext []byte) {
	data := pcm(s, bits)
	nc := len(s.ch)
	var b bytes.Buffer
	chunk := func(id string, body []byte) {
		b.WriteString(id)
		binary.Write(&b, binary.LittleEndian, uint32(len(body)))
		b.Write(body)
		if len(body)%2 == 1 {
			b.WriteByte(0)
		}
	}
	b.WriteString("RIFF\x00\x00\x00\x00WAVE")
	if bext != nil {
		chunk("bext", bext)
	}
	fmtc := make([]byte, 16)
	binary.LittleEndian.PutUint16(fmtc[0:], 1)
	binary.LittleEndian.PutUint16(fmtc[2:], uint16(nc))
	binary.LittleEndian.PutUint32(fmtc[4:], uint32(rate))
	binary.LittleEndian.PutUint32(fmtc[8:], uint32(rate*nc*bits/8))
	binary.LittleEndian.PutUint16(fmtc[12:], uint16(nc*bits/8))
	binary.LittleEndian.PutUint16(fmtc[14:], uint16(bits))
	chunk("fmt ", fmtc)
	chunk("data", data)
	out := b.Bytes()
	binary.LittleEndian.PutUint32(out[4:], uint32(len(out)-8))
	must(os.WriteFile(path, out, 0o644))
}

// writeCorrupt writes a WAV whose fmt chunk is cut off mid-way, as a failed
// copy from an old archive drive would leave it.
func writeCorrupt(path string) {
	b := []byte("RIFF\x24\x10\x00\x00WAVEfmt \x10\x00\x00\x00\x01\x00\x02\x00\x80\xbb")
	must(os.WriteFile(path, b, 0o644))
}

func encodeFLAC(path string, rate, bits int, s signal) {
	tmp := path + ".tmp.wav"
	writeWAV(tmp, rate, bits, s, nil)
	defer os.Remove(tmp)
	run("flac", "--silent", "--force", "-8", "-o", path, tmp)
}

func encodeMP3(path string, rate int, s signal, title string) {
	tmp := path + ".tmp.wav"
	writeWAV(tmp, rate, 16, s, nil)
	defer os.Remove(tmp)
	mode := "j"
	if len(s.ch) == 1 {
		mode = "m"
	}
	run("lame", "--quiet", "-b", "128", "-m", mode, "--tt", title, "--ta", "Kestrel Lane Audio", "--add-id3v2", tmp, path)
}

func run(name string, args ...string) {
	cmd := exec.Command(name, args...)
	cmd.Stderr = os.Stderr
	if err := cmd.Run(); err != nil {
		log.Fatalf("%s: %v (install it with: apt-get install %s)", name, err, name)
	}
}

func must(err error) {
	if err != nil {
		log.Fatal(fmt.Errorf("make-demo: %w", err))
	}
}
