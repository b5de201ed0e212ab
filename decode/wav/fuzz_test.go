package wav_test

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/wav"
)

var updateSeeds = flag.Bool("update-seeds", false, "rewrite the FuzzReader seed corpus in testdata/fuzz/FuzzReader")

// fuzzSeeds are small files covering each path of the reader; they are the
// FuzzReader seed corpus.
func fuzzSeeds() map[string][]byte {
	data, _ := stereo16(6)
	fmt16 := fmtChunk(1, 2, 8000, 16)
	return map[string][]byte{
		"pcm16-stereo":    wavFile("RIFF", fmt16, chunk("data", data)),
		"pcm8-mono":       wavFile("RIFF", fmtChunk(1, 1, 8000, 8), chunk("data", []byte{0, 128, 255})),
		"ext-5.1-24":      wavFile("RIFF", extensibleChunk(6, 48000, 24, 20, 0x3F, 1), chunk("data", make([]byte, 36))),
		"float32":         wavFile("RIFF", fmtChunk(3, 1, 8000, 32), chunk("data", encodeFloat32([]float32{0.5, -1, 2}))),
		"float64":         wavFile("RIFF", fmtChunk(3, 1, 8000, 64), chunk("data", encodeFloat64([]float64{0.25, -0.5}))),
		"rf64":            wavFile("RF64", ds64Chunk(0, uint64(len(data)), 6, map[string]uint64{"JUNK": 2}), fmt16, chunk("data", data).declaring(0xFFFFFFFF)),
		"bw64-bext":       wavFile("BW64", ds64Chunk(0, 8, 2, nil), bextChunk(bextFields{description: "seed", version: 2, loudness: [5]int16{-2300, 0x7FFF, -100, 0, 0}, codingHistory: "A=PCM"}), fmt16, chunk("data", data[:8]).declaring(0xFFFFFFFF)),
		"data-before-fmt": wavFile("RIFF", chunk("data", data), chunk("JUNK", []byte{1, 2, 3}), fmt16),
		"truncated":       wavFile("RIFF", fmt16, chunk("data", data))[:50],
		"unsupported":     wavFile("RIFF", fmtChunk(7, 1, 8000, 8), chunk("data", []byte{1})),
		"ixml-timecode":   wavFile("RIFF", fmt16, chunk("iXML", []byte(ixmlSample)), chunk("data", data)),
		"ixml-broken":     wavFile("RIFF", fmt16, chunk("iXML", []byte("<BWFXML><SPEED><TIMECODE_RATE>25/1</TIME")), chunk("data", data)),
		"undeclared":      wavFile("RIFF", fmt16, chunk("data", data).declaring(8)),
		"trailing-tags": append(wavFile("RIFF", fmt16, chunk("data", data[:8]), chunk("LIST", []byte("INFO")), chunk("id3 ", make([]byte, 3))),
			"ID3\x04\x00\x00\x00\x00\x00\x02\x00\x00TAG"...),
	}
}

// FuzzReader feeds arbitrary bytes to the reader: it must never panic,
// must fail only with the package's typed errors, and must never deliver
// more audio than the file holds.
func FuzzReader(f *testing.F) {
	for _, seed := range fuzzSeeds() {
		f.Add(seed)
	}
	f.Fuzz(func(t *testing.T, file []byte) {
		d, err := wav.New(bytes.NewReader(file), int64(len(file)))
		if err != nil {
			var fe *decode.FormatError
			var ue *decode.UnsupportedError
			if !errors.As(err, &fe) && !errors.As(err, &ue) {
				t.Fatalf("New: untyped error %T: %v", err, err)
			}
			return
		}
		info := d.Info()
		if info.Channels < 1 || info.Channels > 64 || info.SampleRate < 1 || info.SampleRate > 768000 ||
			info.BitsPerSample < 1 || info.BitsPerSample > 64 || (info.Layout != nil && len(info.Layout) != info.Channels) {
			t.Fatalf("implausible Info accepted: %+v", info)
		}
		const bufFrames = 37
		buf := make([]float64, bufFrames*info.Channels)
		total, damaged := int64(0), false
		var samples []float64
		for calls := 0; ; calls++ {
			n, err := d.ReadFrames(buf)
			if n < 0 || n > bufFrames {
				t.Fatalf("ReadFrames returned %d frames", n)
			}
			total += int64(n)
			samples = append(samples, buf[:n*info.Channels]...)
			if err == io.EOF {
				break
			}
			var ie *decode.IntegrityError
			switch {
			case err != nil && (damaged || !errors.As(err, &ie)):
				t.Fatalf("ReadFrames: unexpected error %T: %v", err, err)
			case err != nil:
				damaged = true
			case n == 0:
				t.Fatal("ReadFrames made no progress")
			}
			if calls > len(file) {
				t.Fatal("ReadFrames never ends")
			}
		}
		bytesPerFrame := int64(info.Channels * ((info.BitsPerSample + 7) / 8))
		if total*bytesPerFrame > int64(len(file)) {
			t.Fatalf("delivered %d frames of %d bytes from a %d-byte file", total, bytesPerFrame, len(file))
		}
		if !damaged && info.Frames >= 0 && total != info.Frames {
			t.Fatalf("clean read delivered %d frames, header declares %d", total, info.Frames)
		}
		if u := info.Undeclared; u != nil && (u.Bytes <= 0 || u.Offset+u.Bytes != int64(len(file)) || !(u.Seconds >= 0) || u.Seconds > float64(len(file))) {
			t.Fatalf("implausible undeclared data %+v in a %d-byte file", *u, len(file))
		}
		_ = d.(decode.Noter).Notes()

		// One request of more than the 256 KiB read block goes straight
		// into the caller's buffer and is converted in place: the same
		// samples, bit for bit.
		d2, err := wav.New(bytes.NewReader(file), int64(len(file)))
		if err != nil {
			t.Fatalf("second New: %v", err)
		}
		big := make([]float64, ((256<<10)/info.Channels+1)*info.Channels)
		n, _ := d2.ReadFrames(big)
		if total <= int64(len(big)/info.Channels) && int64(n) != total {
			t.Fatalf("one large request delivered %d frames, small ones %d", n, total)
		}
		for i, x := range samples[:n*info.Channels] {
			if math.Float64bits(big[i]) != math.Float64bits(x) {
				t.Fatalf("sample %d is %v from one large request, %v from small ones", i, big[i], x)
			}
		}
	})
}

// TestFuzzSeedCorpus checks that the committed seed corpus is what
// fuzzSeeds generates; run with -update-seeds to rewrite it.
func TestFuzzSeedCorpus(t *testing.T) {
	dir := filepath.Join("testdata", "fuzz", "FuzzReader")
	for name, seed := range fuzzSeeds() {
		want := fmt.Sprintf("go test fuzz v1\n[]byte(%s)\n", strconv.Quote(string(seed)))
		path := filepath.Join(dir, name)
		if *updateSeeds {
			if err := os.MkdirAll(dir, 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, []byte(want), 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run go test -run TestFuzzSeedCorpus -update-seeds)", err)
		}
		if string(got) != want {
			t.Errorf("%s differs from the generator (run go test -run TestFuzzSeedCorpus -update-seeds)", path)
		}
	}
}
