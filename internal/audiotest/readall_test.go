package audiotest_test

import (
	"bytes"
	"os"
	"reflect"
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// stereoWAV is decode/aiff's 16-bit stereo fixture: 0.2 s at 44.1 kHz =
// 8820 frames (the parameters its make-fixtures.sh gave sox).
const stereoWAV = "../../decode/aiff/testdata/stereo16-44k.wav"

func TestReadAllCountFramesDecodeFile(t *testing.T) {
	want := mustReadSourceWAV(t, stereoWAV).Scaled()
	data, err := os.ReadFile(stereoWAV)
	if err != nil {
		t.Fatal(err)
	}
	for _, block := range []int{1, 1000, 8820, 10000} {
		d, err := decode.New(bytes.NewReader(data))
		if err != nil {
			t.Fatal(err)
		}
		got, err := audiotest.ReadAll(t, d, block)
		if err != nil || !reflect.DeepEqual(got, want) {
			t.Errorf("block %d: err %v, %d samples equal to the source: %v", block, err, len(got), reflect.DeepEqual(got, want))
		}
	}

	d, err := decode.New(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	if n, err := audiotest.CountFrames(d, make([]float64, 2*777)); n != 8820 || err != nil {
		t.Errorf("CountFrames = %d, %v; want 8820, nil", n, err)
	}

	got, info := audiotest.DecodeFile(t, stereoWAV)
	if !reflect.DeepEqual(got, want) || info.SampleRate != 44100 || info.Channels != 2 || info.Frames != 8820 {
		t.Errorf("DecodeFile: %d samples (equal %v), %d Hz, %d ch, %d frames; want %d, 44100, 2, 8820",
			len(got), reflect.DeepEqual(got, want), info.SampleRate, info.Channels, info.Frames, len(want))
	}
}

func TestReadAllTruncated(t *testing.T) {
	// The file cut inside its data chunk: the decoder delivers what is
	// there, then an error, then io.EOF; ReadAll returns both and
	// CountFrames stops at the error.
	want := mustReadSourceWAV(t, stereoWAV).Scaled()
	data, err := os.ReadFile(stereoWAV)
	if err != nil {
		t.Fatal(err)
	}
	cut := data[:len(data)-4000]
	d, err := decode.New(bytes.NewReader(cut))
	if err != nil {
		t.Fatal(err)
	}
	got, err := audiotest.ReadAll(t, d, 1000)
	if err == nil || len(got) == 0 || len(got) >= len(want) || !reflect.DeepEqual(got, want[:len(got)]) {
		t.Errorf("err %v, %d of %d samples; want an error after a correct prefix", err, len(got), len(want))
	}
	d, err = decode.New(bytes.NewReader(cut))
	if err != nil {
		t.Fatal(err)
	}
	if n, err := audiotest.CountFrames(d, make([]float64, 2*1000)); err == nil || n >= 8820 {
		t.Errorf("CountFrames = %d, %v; want fewer than 8820 frames and an error", n, err)
	}
}

func mustReadSourceWAV(t *testing.T, path string) *audiotest.SourceWAV {
	t.Helper()
	w, err := audiotest.ReadSourceWAV(path)
	if err != nil {
		t.Fatal(err)
	}
	return w
}
