package decode

import (
	"slices"
	"strings"
	"testing"
)

// TestLayoutFromMask checks channel masks against Microsoft's definitions
// ("Multiple Channel Audio Data and WAVE Files" and ksmedia.h
// KSAUDIO_SPEAKER_*): bit 0 FL, 1 FR, 2 FC, 3 LFE, 4 BL, 5 BR, 9 SL,
// 10 SR, ...; channels are interleaved in ascending bit order.
func TestLayoutFromMask(t *testing.T) {
	tests := []struct {
		name     string
		mask     uint32
		channels int
		want     []string
	}{
		// KSAUDIO_SPEAKER_5POINT1 = FL|FR|FC|LFE|BL|BR = 0x3F; without side
		// channels the back pair are the 5.1 surrounds (SOURCES.md §5).
		{"5.1 back", 0x3F, 6, []string{"L", "R", "C", "LFE", "Ls", "Rs"}},
		// KSAUDIO_SPEAKER_5POINT1_SURROUND = FL|FR|FC|LFE|SL|SR = 0x60F.
		{"5.1 side", 0x60F, 6, []string{"L", "R", "C", "LFE", "Ls", "Rs"}},
		// KSAUDIO_SPEAKER_7POINT1_SURROUND = 5.1 back + SL|SR = 0x63F: with
		// side channels present the back pair stay back (SOURCES.md §5).
		{"7.1 surround", 0x63F, 8, []string{"L", "R", "C", "LFE", "Lb", "Rb", "Ls", "Rs"}},
		// KSAUDIO_SPEAKER_MONO = SPEAKER_FRONT_CENTER = 0x4.
		{"mono centre", 0x4, 1, []string{"C"}},
		// KSAUDIO_SPEAKER_STEREO = FL|FR = 0x3.
		{"stereo", 0x3, 2, []string{"L", "R"}},
		// KSAUDIO_SPEAKER_QUAD = FL|FR|BL|BR = 0x33.
		{"quad", 0x33, 4, []string{"L", "R", "Ls", "Rs"}},
		// Fewer mask bits than channels: the extra channels have no speaker
		// position (Microsoft channel-mask documentation, from memory);
		// kweigh labels them Ch<n> (its own convention).
		{"mask shorter than channels", 0x3, 4, []string{"L", "R", "Ch3", "Ch4"}},
		// More mask bits than channels: only the first channels are used.
		{"mask longer than channels", 0x3F, 2, []string{"L", "R"}},
		// Bits above 17 (TOP_BACK_RIGHT) have no position name.
		{"reserved bit", 0x1 | 1<<20, 2, []string{"L", "Ch2"}},
		// SPEAKER_ALL (0x80000000) or any mask with no defined position.
		{"no mask", 0, 2, nil},
	}
	for _, tt := range tests {
		if got := LayoutFromMask(tt.mask, tt.channels); !slices.Equal(got, tt.want) {
			t.Errorf("%s: LayoutFromMask(%#x, %d) = %v, want %v", tt.name, tt.mask, tt.channels, got, tt.want)
		}
	}
	// 0x63F names 8 channels (ksmedia.h KSAUDIO_SPEAKER_7POINT1_SURROUND).
	if n := MaskChannels(0x63F); n != 8 {
		t.Errorf("MaskChannels(0x63F) = %d, want 8", n)
	}
}

// TestDefaultLayout checks the layouts assumed without a mask
// (SOURCES.md §5: 1 mono, 2 L R, 5 L R C Ls Rs, 6 L R C LFE Ls Rs; 8 is
// 7.1 in channel-mask order FL FR FC LFE BL BR SL SR, as issue 2 states).
func TestDefaultLayout(t *testing.T) {
	tests := []struct {
		channels int
		want     []string
	}{
		{1, []string{"M"}},
		{2, []string{"L", "R"}},
		{5, []string{"L", "R", "C", "Ls", "Rs"}},
		{6, []string{"L", "R", "C", "LFE", "Ls", "Rs"}},
		{8, []string{"L", "R", "C", "LFE", "Lb", "Rb", "Ls", "Rs"}},
		{10, []string{"Ch1", "Ch2", "Ch3", "Ch4", "Ch5", "Ch6", "Ch7", "Ch8", "Ch9", "Ch10"}},
	}
	for _, tt := range tests {
		if got := DefaultLayout(tt.channels); !slices.Equal(got, tt.want) {
			t.Errorf("DefaultLayout(%d) = %v, want %v", tt.channels, got, tt.want)
		}
	}
}

// TestParseLayout checks presets and label lists. The vocabulary is
// kweigh's own (layout.go); no published source.
func TestParseLayout(t *testing.T) {
	tests := []struct {
		in      string
		want    []string
		wantErr string
	}{
		{"5.1", []string{"L", "R", "C", "LFE", "Ls", "Rs"}, ""},
		{" Stereo ", []string{"L", "R"}, ""},
		{"mono", []string{"M"}, ""},
		{"5.0", []string{"L", "R", "C", "Ls", "Rs"}, ""},
		{"7.1", []string{"L", "R", "C", "LFE", "Lb", "Rb", "Ls", "Rs"}, ""},
		{"L,C,R,Ls,Rs,LFE", []string{"L", "C", "R", "Ls", "Rs", "LFE"}, ""},
		{"L, R, Ch3", []string{"L", "R", "Ch3"}, ""},
		{"L,R,X", nil, `unknown channel label "X"`},
		{"L,R,L", nil, `"L" appears twice`},
		{"", nil, `unknown channel label ""`},
		{"L,,R", nil, `unknown channel label ""`},
		{"Ch0", nil, `unknown channel label "Ch0"`},
		{"Ch01", nil, `unknown channel label "Ch01"`},
		{"l,r", nil, `unknown channel label "l"`},
	}
	for _, tt := range tests {
		got, err := ParseLayout(tt.in)
		switch {
		case tt.wantErr != "" && (err == nil || !strings.Contains(err.Error(), tt.wantErr)):
			t.Errorf("ParseLayout(%q) error = %v, want %q", tt.in, err, tt.wantErr)
		case tt.wantErr == "" && (err != nil || !slices.Equal(got, tt.want)):
			t.Errorf("ParseLayout(%q) = %v, %v; want %v", tt.in, got, err, tt.want)
		}
	}
	// A preset result is a copy: changing it must not change the preset.
	p, _ := ParseLayout("stereo")
	p[0] = "X"
	if again, _ := ParseLayout("stereo"); again[0] != "L" {
		t.Errorf("ParseLayout returned the preset itself")
	}
}
