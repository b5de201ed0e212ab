package flac

import (
	"bytes"
	"fmt"
	"reflect"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
	mewflac "github.com/mewkiz/flac"
)

func TestBitFlipFixtureIsDamaged(t *testing.T) {
	// make-fixtures.sh flips one bit of the byte at 37815 (half the file)
	// in stereo24-48k.flac; the reference decoder (flac -t) reports a frame
	// CRC mismatch there. The decoder must skip that frame, resume at the
	// next one and say how much was lost: one 4096-sample block (the
	// block size flac --best uses at 48 kHz).
	data := audiotest.Fixture(t, "stereo24-48k-bitflip.flac")
	offs := frameOffsets(t, audiotest.Fixture(t, "stereo24-48k.flac"))
	k := 0
	for offs[k+1] <= 37815 {
		k++
	}
	got, err, d := decodeAll(t, data, DefaultOptions(), 4096)
	if !isIntegrity(err) {
		t.Fatalf("err = %v, want *decode.IntegrityError", err)
	}
	for _, want := range []string{fmt.Sprintf("frame %d at byte %d", k, offs[k]), "CRC-16",
		fmt.Sprintf("next valid frame, byte %d", offs[k+1]), "4096 samples per channel (0.085 s) lost"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q does not say %q", err, want)
		}
	}
	src := audiotest.FixtureWAV(t, "stereo24-48k.wav").Scaled()
	want := append(clone64(src[:2*k*4096]), src[2*(k+1)*4096:]...)
	if !reflect.DeepEqual(got, want) {
		t.Errorf("delivered %d samples; want the %d of the source without frame %d", len(got), len(want), k)
	}
	if d.MD5Verified() {
		t.Error("MD5 reported verified for a damaged stream")
	}
}

func clone64(b []float64) []float64 { return append([]float64(nil), b...) }

func TestCRCValidFlipCaughtByMD5(t *testing.T) {
	// Flip one audio bit and repair the frame's CRC-16 so that only the MD5
	// signature can tell: the case STREAMINFO's MD5 exists for.
	data := audiotest.Fixture(t, "stereo24-48k.flac")
	offs := frameOffsets(t, data)
	if len(offs) < 4 {
		t.Fatalf("only %d frames", len(offs)-1)
	}
	start, end := offs[1], offs[2] // the second frame
	for pos := start + (end-start)/2; pos < end-2; pos++ {
		for bit := 0; bit < 8; bit++ {
			bad := clone(data)
			bad[pos] ^= 1 << bit
			crc := crc16(bad[start : end-2])
			bad[end-2], bad[end-1] = byte(crc>>8), byte(crc)
			if !framesParse(bad) {
				continue // the flip broke the frame structure; try another
			}
			got, err, _ := decodeAll(t, bad, DefaultOptions(), 4096)
			if !isIntegrity(err) || !strings.Contains(err.Error(), "MD5") {
				t.Fatalf("byte %d bit %d flipped, CRC repaired: err = %v, want an MD5 IntegrityError", pos, bit, err)
			}
			if len(got) != 28800*2 {
				t.Errorf("delivered %d samples, want all 57600 before the MD5 verdict", len(got))
			}
			_, err, _ = decodeAll(t, bad, Options{VerifyMD5: false}, 4096)
			if err != nil {
				t.Errorf("with MD5 off the same file should decode without complaint, got %v", err)
			}
			return
		}
	}
	t.Fatal("no single-bit flip kept the frame decodable")
}

// framesParse reports whether every frame of data decodes and passes its
// CRCs.
func framesParse(data []byte) bool {
	stream, err := mewflac.New(bytes.NewReader(data))
	if err != nil {
		return false
	}
	for {
		if _, err := stream.ParseNext(); err != nil {
			return err.Error() == "EOF"
		}
	}
}

func TestStreamInfoEdits(t *testing.T) {
	data := audiotest.Fixture(t, "mono16-44k.flac")
	want, err, _ := decodeAll(t, data, DefaultOptions(), 4096)
	if err != nil {
		t.Fatal(err)
	}
	flipMD5 := clone(data)
	flipMD5[md5Offset+5] ^= 0x01
	zeroMD5 := clone(data)
	copy(zeroMD5[md5Offset:md5Offset+16], make([]byte, 16))
	noLength := clone(data)
	noLength[totalSamplesByte] &= 0xF0
	copy(noLength[totalSamplesByte+1:totalSamplesByte+5], make([]byte, 4))
	longer := clone(data)
	longer[totalSamplesByte+4]++ // declares one sample more than the stream holds
	shorter := clone(data)
	shorter[totalSamplesByte+4]-- // declares one sample fewer
	trailing := append(clone(data), append([]byte("TAG"), make([]byte, 125)...)...)

	tests := []struct {
		name     string
		data     []byte
		opts     Options
		wantErr  string // substring of an IntegrityError, "" = clean
		verified bool
		frames   int64
		wantNote string
	}{
		{"clean", data, DefaultOptions(), "", true, 66150, ""},
		{"MD5 flipped", flipMD5, DefaultOptions(), "MD5", false, 66150, ""},
		{"MD5 flipped, verification off", flipMD5, Options{}, "", false, 66150, "turned off"},
		{"MD5 all zero", zeroMD5, DefaultOptions(), "", false, 66150, "no MD5 signature"},
		{"length unknown", noLength, DefaultOptions(), "", true, -1, ""},
		{"declares one sample more", longer, DefaultOptions(), "STREAMINFO declares 66151", false, 66151, ""},
		{"declares one sample fewer", shorter, DefaultOptions(), "the stream holds 66150 samples per channel, STREAMINFO declares 66149", false, 66149, ""},
		{"ID3v1 tag after the frames", trailing, DefaultOptions(), "", true, 66150, "ignored the bytes after the last FLAC frame"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err, d := decodeAll(t, tc.data, tc.opts, 4096)
			switch {
			case tc.wantErr == "" && err != nil:
				t.Fatalf("err = %v, want none", err)
			case tc.wantErr != "" && (!isIntegrity(err) || !strings.Contains(err.Error(), tc.wantErr)):
				t.Fatalf("err = %v, want an IntegrityError about %q", err, tc.wantErr)
			}
			if !reflect.DeepEqual(got, want) {
				t.Errorf("samples differ from the clean decode (%d vs %d)", len(got), len(want))
			}
			if d.MD5Verified() != tc.verified {
				t.Errorf("MD5Verified = %v, want %v", d.MD5Verified(), tc.verified)
			}
			if d.Info().Frames != tc.frames {
				t.Errorf("Frames = %d, want %d", d.Info().Frames, tc.frames)
			}
			notes := strings.Join(d.Notes(), "\n")
			if (tc.wantNote == "") != (notes == "") || !strings.Contains(notes, tc.wantNote) {
				t.Errorf("notes = %q, want %q", notes, tc.wantNote)
			}
		})
	}
}

func TestTruncatedNeverPanics(t *testing.T) {
	data := audiotest.Fixture(t, "stereo24-48k.flac")
	offs := frameOffsets(t, data)
	cuts := []int{0, 3, 4, 7, 8, 20, 41, 42, 43}
	for _, o := range offs[:3] {
		cuts = append(cuts, int(o)-1, int(o), int(o)+1, int(o)+5, int(o)+100)
	}
	cuts = append(cuts, len(data)/2, len(data)-2, len(data)-1)
	for _, cut := range cuts {
		if cut < 0 || cut > len(data) {
			continue
		}
		t.Run(fmt.Sprint(cut), func(t *testing.T) {
			_, err, _ := decodeAll(t, data[:cut], DefaultOptions(), 4096)
			if !isIntegrity(err) && !isFormat(err) {
				t.Errorf("cut at %d of %d: err = %v, want IntegrityError or FormatError", cut, len(data), err)
			}
		})
	}
}
