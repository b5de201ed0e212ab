package wav_test

import (
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// stereo16 is a short 16-bit stereo fixture and its expected samples
// (value / 2^15).
func stereo16(frames int) (data []byte, want []float64) {
	values := testInts(frames*2, 16)
	for _, v := range values {
		want = append(want, float64(v)/(1<<15))
	}
	return encodeInts(values, 16, 16), want
}

// TestContainers reads RF64 and BW64 files built over a small data chunk:
// a ds64 chunk first holding the 64-bit sizes, the 32-bit size fields set
// to 0xFFFFFFFF (EBU Tech 3306 §3; ITU-R BS.2088 §5), and checks chunk
// order independence of plain RIFF (Microsoft RIFF: chunks in any order,
// odd sizes padded to even; EBU Tech 3306 §3 for JUNK placeholders).
func TestContainers(t *testing.T) {
	data, want := stereo16(500)
	fmt16 := fmtChunk(1, 2, 48000, 16)
	dataSize := uint64(len(data))
	dataSeeDS64 := chunk("data", data).declaring(0xFFFFFFFF)
	odd := chunk("zzzz", []byte{1, 2, 3})
	oddLastNoPad := chunk("LIST", []byte("INFOx"))
	oddLastNoPad.noPad = true
	big := chunk("axml", []byte("<ebuCoreMain/>")).declaring(0xFFFFFFFF)

	tests := []struct {
		name      string
		file      []byte
		container string
		frames    int64
	}{
		{"RF64", wavFile("RF64", ds64Chunk(0, dataSize, 500, nil), fmt16, dataSeeDS64), "rf64", 500},
		{"BW64", wavFile("BW64", ds64Chunk(0, dataSize, 500, nil), fmt16, dataSeeDS64), "bw64", 500},
		{"BW64 with table entry", wavFile("BW64", ds64Chunk(0, dataSize, 500, map[string]uint64{"axml": 14}), big, fmt16, dataSeeDS64), "bw64", 500},
		{"RF64 with 32-bit data size", wavFile("RF64", ds64Chunk(0, 0, 0, nil), fmt16, chunk("data", data)), "rf64", 500},
		{"RF64 chunk after data", wavFile("RF64", ds64Chunk(0, dataSize, 500, nil), fmt16, dataSeeDS64, chunk("LIST", []byte("INFO"))), "rf64", 500},
		{"JUNK before fmt", wavFile("RIFF", chunk("JUNK", make([]byte, 28)), fmt16, chunk("data", data)), "wav", 500},
		{"odd unknown chunk padded", wavFile("RIFF", odd, fmt16, odd, chunk("data", data)), "wav", 500},
		{"data before fmt", wavFile("RIFF", chunk("data", data), chunk("fact", []byte{0, 0, 0, 0}), fmt16), "wav", 500},
		{"odd last chunk without pad byte", wavFile("RIFF", fmt16, chunk("data", data), oddLastNoPad), "wav", 500},
		{"trailing bytes after the form", append(wavFile("RIFF", fmt16, chunk("data", data)), "TAG+junk"...), "wav", 500},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			d := open(t, tt.file)
			if info := d.Info(); info.Container != tt.container || info.Frames != tt.frames || info.Channels != 2 {
				t.Fatalf("Info = %+v, want container %s, %d frames", info, tt.container, tt.frames)
			}
			got, err := audiotest.ReadAll(t, d, 64)
			if err != nil {
				t.Fatal(err)
			}
			sameBits(t, got, want)
		})
	}
}

// TestRF64OddDataPadding checks that an odd-sized data chunk in RF64 is
// followed by its pad byte and the next chunk is still found.
func TestRF64OddDataPadding(t *testing.T) {
	values := testInts(3, 8)
	data := encodeInts(values, 8, 8)
	file := wavFile("RF64", ds64Chunk(0, 3, 3, nil), chunk("data", data).declaring(0xFFFFFFFF),
		fmtChunk(1, 1, 8000, 8), bextChunk(bextFields{description: "after odd data", version: 1}))
	d := open(t, file)
	if b := d.Info().Bext; b == nil || b.Description != "after odd data" {
		t.Fatalf("Bext = %+v, want the chunk after the padded data", b)
	}
	got, err := audiotest.ReadAll(t, d, 2)
	if err != nil {
		t.Fatal(err)
	}
	sameBits(t, got, []float64{float64(values[0]) / 128, float64(values[1]) / 128, float64(values[2]) / 128})
}

func ptr(v float64) *float64 { return &v }

// TestBext checks the bext fields at the offsets of EBU Tech 3285 v2 §2.3;
// loudness fields are round(100 × value) from version 2 on, 0x7FFF meaning
// "not set" (SOURCES.md §5, marked [memory]). The invented scenario: a
// bulletin from the fictional Harbourlight Radio.
func TestBext(t *testing.T) {
	loud := [5]int16{-2300, 540, -120, 0x7FFF, -1875}
	tests := []struct {
		name    string
		version uint16
		want    [5]*float64
	}{
		// -2300/100 = -23.00 LUFS, 540/100 = 5.40 LU, -120/100 = -1.20 dBTP,
		// 0x7FFF not set, -1875/100 = -18.75 LUFS (EBU Tech 3285 v2 §2.3).
		{"version 2", 2, [5]*float64{ptr(-23), ptr(5.4), ptr(-1.2), nil, ptr(-18.75)}},
		// Version 1 has no loudness fields (EBU Tech 3285 v1 reserved those bytes).
		{"version 1", 1, [5]*float64{}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b := bextChunk(bextFields{
				description:   "Harbourlight Radio evening bulletin, take 3",
				originator:    "Harbourlight Studio B",
				reference:     "HLR-2024-0305-B3",
				date:          "2024-03-05",
				time:          "18:30:00",
				timeReference: 5_000_000_000, // needs the high 32-bit word
				version:       tt.version,
				loudness:      loud,
				codingHistory: "A=PCM,F=48000,W=24,M=stereo,T=Harbourlight desk\r\n\x00\x00",
			})
			data, _ := stereo16(4)
			d := open(t, wavFile("RIFF", b, fmtChunk(1, 2, 48000, 16), chunk("data", data)))
			got := d.Info().Bext
			if got == nil {
				t.Fatal("Bext = nil")
			}
			if got.Description != "Harbourlight Radio evening bulletin, take 3" || got.Originator != "Harbourlight Studio B" ||
				got.OriginatorReference != "HLR-2024-0305-B3" || got.OriginationDate != "2024-03-05" ||
				got.OriginationTime != "18:30:00" || got.TimeReference != 5_000_000_000 || got.Version != int(tt.version) ||
				got.CodingHistory != "A=PCM,F=48000,W=24,M=stereo,T=Harbourlight desk" {
				t.Errorf("Bext = %+v", got)
			}
			fields := [5]*float64{got.LoudnessValue, got.LoudnessRange, got.MaxTruePeakLevel, got.MaxMomentaryLoudness, got.MaxShortTermLoudness}
			for i := range fields {
				switch {
				case (fields[i] == nil) != (tt.want[i] == nil):
					t.Errorf("loudness field %d = %v, want %v", i, fields[i], tt.want[i])
				case fields[i] != nil && *fields[i] != *tt.want[i]:
					t.Errorf("loudness field %d = %v, want %v", i, *fields[i], *tt.want[i])
				}
			}
		})
	}
}

// TestBextShort checks that a bext chunk too short for the standard's 602
// bytes still yields what it holds, with a note, and no loudness values.
func TestBextShort(t *testing.T) {
	short := make([]byte, 100)
	copy(short, "cut short")
	data, _ := stereo16(1)
	d := open(t, wavFile("RIFF", chunk("bext", short), fmtChunk(1, 2, 48000, 16), chunk("data", data)))
	b := d.Info().Bext
	if b == nil || b.Description != "cut short" || b.Version != 0 || b.LoudnessValue != nil {
		t.Errorf("Bext = %+v", b)
	}
	notes := d.(decode.Noter).Notes()
	if !slices.ContainsFunc(notes, func(n string) bool { return strings.Contains(n, "bext chunk") }) {
		t.Errorf("Notes() = %q, want a note about the short bext chunk", notes)
	}
}
