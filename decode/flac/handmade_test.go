package flac

import (
	"bytes"
	"crypto/md5"
	"encoding/binary"
	"io"
	"runtime"
	"testing"
)

// crc8 is the FLAC frame-header checksum: polynomial x^8 + x^2 + x + 1,
// initialised with 0 (FLAC format, FRAME_HEADER).
func crc8(b []byte) byte {
	var crc byte
	for _, x := range b {
		crc ^= x
		for range 8 {
			if crc&0x80 != 0 {
				crc = crc<<1 ^ 0x07
			} else {
				crc <<= 1
			}
		}
	}
	return crc
}

// utf8Number codes a frame number the way FLAC does (FLAC format,
// FRAME_HEADER: "UTF-8" coded, as for code points, up to 31 bits here).
func utf8Number(n uint32) []byte {
	switch {
	case n < 0x80:
		return []byte{byte(n)}
	case n < 0x800:
		return []byte{0xC0 | byte(n>>6), 0x80 | byte(n&0x3F)}
	default:
		return []byte{0xE0 | byte(n>>12), 0x80 | byte(n>>6&0x3F), 0x80 | byte(n&0x3F)}
	}
}

// constantFLAC builds, from the format specification alone, a mono 16-bit
// 48 kHz FLAC stream of the given number of 4096-sample frames, frame i
// holding the constant value level(i) (SUBFRAME_CONSTANT). It returns the
// file and the samples it encodes.
func constantFLAC(frames int, level func(int) int16) ([]byte, []int16) {
	const block = 4096
	samples := make([]int16, 0, frames*block)
	var audio bytes.Buffer
	for i := range frames {
		v := level(i)
		for range block {
			samples = append(samples, v)
		}
		// Sync 0xFFF8 (fixed block size); block size code 12 (256·2^4 =
		// 4096); rate code 10 (48 kHz); channels 0 (mono); size code 4
		// (16 bits); reserved 0.
		h := []byte{0xFF, 0xF8, 0xCA, 0x08}
		h = append(h, utf8Number(uint32(i))...)
		h = append(h, crc8(h))
		f := append(h, 0x00, byte(uint16(v)>>8), byte(v)) // constant subframe
		crc := crc16(f)
		audio.Write(append(f, byte(crc>>8), byte(crc)))
	}
	// MD5 of the samples, little-endian 16-bit (METADATA_BLOCK_STREAMINFO).
	pcm := make([]byte, 2*len(samples))
	for i, v := range samples {
		binary.LittleEndian.PutUint16(pcm[2*i:], uint16(v))
	}
	sum := md5.Sum(pcm)

	var out bytes.Buffer
	out.WriteString("fLaC")
	out.Write([]byte{0x80, 0, 0, 34}) // last block, STREAMINFO, 34 bytes
	binary.Write(&out, binary.BigEndian, uint16(block))
	binary.Write(&out, binary.BigEndian, uint16(block))
	out.Write([]byte{0, 0, 0, 0, 0, 0}) // frame sizes unknown
	// 20 bits rate, 3 bits channels-1, 5 bits bits-1, 36 bits samples.
	packed := uint64(48000)<<44 | uint64(0)<<41 | uint64(15)<<36 | uint64(len(samples))
	binary.Write(&out, binary.BigEndian, packed)
	out.Write(sum[:])
	out.Write(audio.Bytes())
	return out.Bytes(), samples
}

func TestHandMadeStream(t *testing.T) {
	data, samples := constantFLAC(40, func(i int) int16 { return int16(i*811 - 16000) })
	got, err, d := decodeAll(t, data, DefaultOptions(), 1000)
	if err != nil {
		t.Fatal(err)
	}
	if !d.MD5Verified() || d.Info().Frames != int64(len(samples)) || d.Info().SampleRate != 48000 {
		t.Fatalf("verified %v, info %+v", d.MD5Verified(), d.Info())
	}
	for i, v := range samples {
		if got[i] != float64(v)/32768 { // value / 2^(bits-1), exact
			t.Fatalf("sample %d = %v, want %v", i, got[i], float64(v)/32768)
		}
	}
}

// TestMemoryFlat decodes a 10-minute stream and a 1-minute one and compares
// the live heap while decoding: streaming must not keep more for the longer
// file.
func TestMemoryFlat(t *testing.T) {
	if testing.Short() {
		t.Skip("decodes 11 minutes of audio")
	}
	level := func(i int) int16 { return int16(i%200*100 - 10000) }
	peak := func(frames int) uint64 {
		data, _ := constantFLAC(frames, level)
		d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		buf := make([]float64, 4096)
		var most uint64
		var ms runtime.MemStats
		for calls := 0; ; calls++ {
			_, err := d.ReadFrames(buf)
			if calls%500 == 0 {
				runtime.GC()
				runtime.ReadMemStats(&ms)
				most = max(most, ms.HeapAlloc-uint64(len(data)))
			}
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
		}
		runtime.KeepAlive(data)
		return most
	}
	short := peak(48000 * 60 / 4096)
	long := peak(48000 * 600 / 4096)
	t.Logf("live heap while decoding: 1 min %d B, 10 min %d B", short, long)
	if long > short+256<<10 {
		t.Errorf("live heap grew from %d B (1 min) to %d B (10 min)", short, long)
	}
}
