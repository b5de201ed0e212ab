package external_test

import (
	"bytes"
	"encoding/binary"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// tool returns the path of a Debian program the tests run, or fails: the
// bridge's tests make their fixtures at run time with ffmpeg (.ci/setup
// installs it).
func tool(t testing.TB, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		t.Fatalf("these tests need %s (run bash .ci/setup): %v", name, err)
	}
	return p
}

// encode runs ffmpeg to encode or re-wrap files made by the tests. It is
// given codecs and container options only, never a filter.
func encode(t testing.TB, args ...string) {
	t.Helper()
	for _, a := range args {
		if a == "-af" || a == "-filter_complex" || a == "-lavfi" {
			t.Fatal("fixtures are never made with ffmpeg filters")
		}
	}
	cmd := exec.Command(tool(t, "ffmpeg"), append([]string{"-nostdin", "-hide_banner", "-v", "error", "-y"}, args...)...)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("ffmpeg %s: %v\n%s", strings.Join(args, " "), err, out)
	}
}

// signal is a deterministic programme-like test signal: three tones per
// channel at a level that differs by channel, plus a little noise from a
// fixed linear congruential generator, so that channel order and level
// errors show.
func signal(rate, channels int, seconds float64) []float64 {
	n := int(seconds * float64(rate))
	x := make([]float64, n*channels)
	seed := uint32(12345)
	for c := range channels {
		amp := 0.2 / float64(1+c) // channel c is 20·log10(1+c) dB below channel 0
		f := 220 * float64(c+1)
		for i := range n {
			seed = seed*1664525 + 1013904223
			noise := (float64(seed>>8)/float64(1<<24) - 0.5) * 0.01
			t := float64(i) / float64(rate)
			x[i*channels+c] = amp*(math.Sin(2*math.Pi*f*t)+0.5*math.Sin(2*math.Pi*3.1*f*t)+0.25*math.Sin(2*math.Pi*7.3*f*t))/1.75 + noise
		}
	}
	return x
}

// writeWAV24 writes interleaved samples in ±1 as a 24-bit
// WAVE_FORMAT_EXTENSIBLE file with the given channel mask (Microsoft
// WAVEFORMATEXTENSIBLE; mask 0 writes a plain PCM header).
func writeWAV24(t testing.TB, path string, rate, channels int, mask uint32, samples []float64) {
	t.Helper()
	data := make([]byte, 0, 3*len(samples))
	for _, v := range samples {
		s := int32(max(-8388608, min(8388607, math.Round(v*8388608))))
		data = append(data, byte(s), byte(s>>8), byte(s>>16))
	}
	var fmtChunk []byte
	le := binary.LittleEndian
	fmtChunk = le.AppendUint16(fmtChunk, 1)
	if mask != 0 {
		fmtChunk[0], fmtChunk[1] = 0xFE, 0xFF
	}
	fmtChunk = le.AppendUint16(fmtChunk, uint16(channels))
	fmtChunk = le.AppendUint32(fmtChunk, uint32(rate))
	fmtChunk = le.AppendUint32(fmtChunk, uint32(rate*channels*3))
	fmtChunk = le.AppendUint16(fmtChunk, uint16(channels*3))
	fmtChunk = le.AppendUint16(fmtChunk, 24)
	if mask != 0 {
		fmtChunk = le.AppendUint16(fmtChunk, 22)
		fmtChunk = le.AppendUint16(fmtChunk, 24)
		fmtChunk = le.AppendUint32(fmtChunk, mask)
		// KSDATAFORMAT_SUBTYPE_PCM {00000001-0000-0010-8000-00aa00389b71}
		fmtChunk = append(fmtChunk, 1, 0, 0, 0, 0, 0, 0x10, 0, 0x80, 0, 0, 0xAA, 0, 0x38, 0x9B, 0x71)
	}
	var b bytes.Buffer
	b.WriteString("RIFF")
	binary.Write(&b, le, uint32(4+8+len(fmtChunk)+8+len(data)))
	b.WriteString("WAVEfmt ")
	binary.Write(&b, le, uint32(len(fmtChunk)))
	b.Write(fmtChunk)
	b.WriteString("data")
	binary.Write(&b, le, uint32(len(data)))
	b.Write(data)
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// children returns the ids of this process's child processes and which of
// them are zombies, from /proc (Linux).
func children(t testing.TB) (live, zombies []int) {
	if t != nil {
		t.Helper()
	}
	self := os.Getpid()
	stats, _ := filepath.Glob("/proc/[0-9]*/stat")
	for _, p := range stats {
		b, err := os.ReadFile(p)
		if err != nil {
			continue
		}
		s := string(b)
		i := strings.LastIndexByte(s, ')')
		if i < 0 {
			continue
		}
		f := strings.Fields(s[i+1:])
		if len(f) < 2 {
			continue
		}
		ppid, _ := strconv.Atoi(f[1])
		if ppid != self {
			continue
		}
		pid, _ := strconv.Atoi(strings.Fields(s)[0])
		if f[0] == "Z" {
			zombies = append(zombies, pid)
		} else {
			live = append(live, pid)
		}
	}
	return live, zombies
}

// noChildren fails when the bridge left a child running or unreaped.
func noChildren(t testing.TB) {
	t.Helper()
	live, zombies := children(t)
	if len(live) > 0 || len(zombies) > 0 {
		t.Errorf("children left behind: running %v, zombies %v", live, zombies)
	}
}
