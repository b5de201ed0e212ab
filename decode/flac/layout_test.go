package flac

import (
	"bytes"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

func TestFLACChannelOrder(t *testing.T) {
	// FLAC format specification, FRAME_HEADER "Channel assignment" (counts 1
	// to 8), with the back pair read as the surrounds when there is no side
	// pair and the side pair as the surrounds in 7.1.
	want := map[int]string{
		1: "M",
		2: "L R",
		3: "L R C",
		4: "L R Ls Rs",
		5: "L R C Ls Rs",
		6: "L R C LFE Ls Rs",
		7: "L R C LFE Cb Ls Rs",
		8: "L R C LFE Lb Rb Ls Rs",
	}
	for n := 1; n <= 8; n++ {
		if got := strings.Join(flacOrder[n], " "); got != want[n] {
			t.Errorf("%d channels: %s, want %s", n, got, want[n])
		}
	}
}

func TestChannelMaskTag(t *testing.T) {
	stereo := audiotest.Fixture(t, "stereo24-48k.flac")
	tests := []struct {
		name     string
		data     []byte
		layout   string
		mask     uint32
		wantNote string
	}{
		// The 5.1 fixture carries WAVEFORMATEXTENSIBLE_CHANNEL_MASK=0x003F,
		// written by flac from sox's WAVE mask (metaflac --list shows it);
		// bits 0-5 are FL FR FC LFE BL BR (Microsoft channel-mask
		// documentation), the back pair being the 5.1 surrounds.
		{"5.1 fixture", audiotest.Fixture(t, "surround51-16-44k.flac"), "L R C LFE Ls Rs", 0x3F, ""},
		// sox writes a 24-bit WAV as WAVE_FORMAT_EXTENSIBLE with mask 0x3
		// (FL FR), and flac keeps it.
		{"stereo fixture", stereo, "L R", 0x3, ""},
		{"no tag", audiotest.Fixture(t, "mono16-44k.flac"), "M", 0, ""},
		// Bits 9 and 10 are side left and side right.
		{"side pair", withVorbisComment(stereo, "WAVEFORMATEXTENSIBLE_CHANNEL_MASK=0x0600"), "Ls Rs", 0x600, ""},
		{"lower-case name, decimal", withVorbisComment(stereo, "waveformatextensible_channel_mask=1536"), "Ls Rs", 0x600, ""},
		{"three channels for two", withVorbisComment(stereo, "WAVEFORMATEXTENSIBLE_CHANNEL_MASK=0x0007"), "L R", 0, "names 3 channels"},
		{"garbage", withVorbisComment(stereo, "WAVEFORMATEXTENSIBLE_CHANNEL_MASK=front"), "L R", 0, "not a channel mask"},
		{"broken comment", withVorbisComment(stereo, "no equals sign"), "L R", 0, "could not read the Vorbis comment"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d, err := NewDecoder(bytes.NewReader(tc.data), int64(len(tc.data)), DefaultOptions())
			if err != nil {
				t.Fatal(err)
			}
			info := d.Info()
			if got := strings.Join(info.Layout, " "); got != tc.layout || info.ChannelMask != tc.mask {
				t.Errorf("layout %q mask %#x, want %q %#x", got, info.ChannelMask, tc.layout, tc.mask)
			}
			notes := strings.Join(d.Notes(), "\n")
			if (tc.wantNote == "") != (notes == "") || !strings.Contains(notes, tc.wantNote) {
				t.Errorf("notes = %q, want %q", notes, tc.wantNote)
			}
			// The samples do not depend on the tag.
			if _, err, _ := decodeAll(t, tc.data, DefaultOptions(), 4096); err != nil {
				t.Errorf("decode: %v", err)
			}
		})
	}
}
