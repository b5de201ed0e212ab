package aiff

import (
	"bytes"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestHeaderDeclaresLess: a COMM frame count, SSND size or FORM size that
// covers half of the audio present delivers the declared half and reports
// the rest as undeclared data; chunks and tags after the audio stay silent.
func TestHeaderDeclaresLess(t *testing.T) {
	const rate, seconds = 48000, 4
	rng := rand.New(rand.NewPCG(2, 2))
	ints := make([]int32, rate*seconds)
	for i := range ints {
		ints[i] = int32(rng.IntN(60000) - 30000)
	}
	half := int64(len(ints) / 2)
	spec := aiffSpec{channels: 1, bits: 16, rate: rate, ints: ints, commFrames: half, formSize: -1}
	commHalved := buildAIFF(spec)
	ssnd := int64(bytes.Index(commHalved, []byte("SSND")))
	dataOff := ssnd + 16 // chunk header, offset and block size fields
	if ssnd < 0 {
		t.Fatal("no SSND")
	}
	ssndHalved := bytes.Clone(commHalved)
	binary.BigEndian.PutUint32(ssndHalved[ssnd+4:], uint32(8+2*half))
	allHalved := bytes.Clone(ssndHalved)
	binary.BigEndian.PutUint32(allHalved[4:], uint32(dataOff+2*half-8))

	// A correct file with an ID3 chunk inside the FORM and an ID3v2 tag
	// appended after it.
	spec.ints, spec.commFrames = ints[:half], -1
	var tagged bytes.Buffer
	tagged.Write(buildAIFF(spec))
	chunk(&tagged, "ID3 ", make([]byte, 301))
	chunk(&tagged, "ANNO", []byte("Quayside Sessions ep. 3"))
	tagged.Write(append([]byte("ID3\x03\x00\x00\x00\x00\x00\x40"), make([]byte, 64)...))
	b := tagged.Bytes()
	binary.BigEndian.PutUint32(b[4:], uint32(len(b)-8-74))

	for _, tc := range []struct {
		name    string
		file    []byte
		offset  int64 // -1: none
		seconds float64
		note    string
	}{
		{"COMM frame count halved", commHalved, dataOff + 2*half, 2, ""},
		{"COMM and SSND halved", ssndHalved, dataOff + 2*half, 2, ""},
		{"COMM, SSND and FORM halved", allHalved, dataOff + 2*half, 2, ""},
		{"chunks and tags after the audio", b, -1, 0, ""},
		{"200 garbage bytes", append(bytes.Clone(b), bytes.Repeat([]byte{0xF3}, 200)...), int64(len(b)), 100.0 / rate, ""},
		{"3 stray bytes", append(bytes.Clone(b), 0xF3, 0xF3, 0xF3), -1, 0, "3 stray bytes"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, err, d := decodeAll(t, tc.file, 4096)
			if err != nil {
				t.Fatal(err)
			}
			if int64(len(got)) != half {
				t.Errorf("%d frames delivered, want the declared %d", len(got), half)
			}
			u := d.Info().Undeclared
			switch {
			case tc.offset < 0 && u != nil:
				t.Errorf("undeclared %+v, want none", *u)
			case tc.offset >= 0 && u == nil:
				t.Errorf("no undeclared data, want %.3f s at byte %d", tc.seconds, tc.offset)
			case u != nil && (u.Offset != tc.offset || math.Abs(u.Seconds-tc.seconds) > 1e-9 || u.Bytes != int64(len(tc.file))-tc.offset):
				t.Errorf("undeclared %+v, want %.3f s at byte %d", *u, tc.seconds, tc.offset)
			}
			notes := strings.Join(d.Notes(), "; ")
			if tc.note != "" && !strings.Contains(notes, tc.note) || tc.note == "" && notes != "" {
				t.Errorf("notes %q, want %q", notes, tc.note)
			}
		})
	}
}
