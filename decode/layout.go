package decode

import (
	"fmt"
	"math/bits"
	"strings"
)

// Channel labels. They name loudspeaker positions; package loudness maps
// each to its BS.1770 weight. The vocabulary is small on purpose: it is what
// appears in the JSON output ("channel_layout").
const (
	Mono            = "M"   // a single channel
	FrontLeft       = "L"   // WAVE channel-mask bit 0
	FrontRight      = "R"   // bit 1
	FrontCenter     = "C"   // bit 2
	LowFrequency    = "LFE" // bit 3
	BackLeft        = "Lb"  // bit 4 when side channels exist too
	BackRight       = "Rb"  // bit 5 when side channels exist too
	FrontLeftInner  = "Lc"  // bit 6
	FrontRightInner = "Rc"  // bit 7
	BackCenter      = "Cb"  // bit 8
	SurroundLeft    = "Ls"  // bit 9, or bit 4 in a 5.1 mask without side channels
	SurroundRight   = "Rs"  // bit 10, or bit 5 in a 5.1 mask without side channels
	TopCenter       = "Tc"  // bit 11
	TopFrontLeft    = "Tfl" // bit 12
	TopFrontCenter  = "Tfc" // bit 13
	TopFrontRight   = "Tfr" // bit 14
	TopBackLeft     = "Tbl" // bit 15
	TopBackCenter   = "Tbc" // bit 16
	TopBackRight    = "Tbr" // bit 17
)

// maskLabels maps WAVE_FORMAT_EXTENSIBLE channel-mask bits to labels
// (Microsoft channel-mask documentation; channels are interleaved in
// ascending bit order).
var maskLabels = [18]string{
	FrontLeft, FrontRight, FrontCenter, LowFrequency, BackLeft, BackRight,
	FrontLeftInner, FrontRightInner, BackCenter, SurroundLeft, SurroundRight,
	TopCenter, TopFrontLeft, TopFrontCenter, TopFrontRight, TopBackLeft,
	TopBackCenter, TopBackRight,
}

const (
	maskBackLeft  = 1 << 4
	maskBackRight = 1 << 5
	maskSideLeft  = 1 << 9
	maskSideRight = 1 << 10
)

// LayoutFromMask returns the labels of the first channels channels of a
// WAVE channel mask. In a mask with back but no side channels (the common
// 5.1 mask 0x3F) the back pair are the surrounds, labelled Ls/Rs. Channels
// the mask does not cover are labelled "Ch<n>" (1-based) and weighted as
// front channels. A mask of 0 yields nil: the file says nothing.
func LayoutFromMask(mask uint32, channels int) []string {
	if mask == 0 || channels <= 0 {
		return nil
	}
	hasSides := mask&(maskSideLeft|maskSideRight) != 0
	labels := make([]string, 0, channels)
	for bit := 0; bit < 32 && len(labels) < channels; bit++ {
		if mask&(1<<bit) == 0 {
			continue
		}
		switch {
		case bit >= len(maskLabels):
			labels = append(labels, fmt.Sprintf("Ch%d", len(labels)+1))
		case bit == 4 && !hasSides:
			labels = append(labels, SurroundLeft)
		case bit == 5 && !hasSides:
			labels = append(labels, SurroundRight)
		default:
			labels = append(labels, maskLabels[bit])
		}
	}
	for len(labels) < channels {
		labels = append(labels, fmt.Sprintf("Ch%d", len(labels)+1))
	}
	return labels
}

// MaskChannels returns the number of channels a mask names.
func MaskChannels(mask uint32) int { return bits.OnesCount32(mask) }

// DefaultLayout is the layout assumed for a file that does not declare one:
// 1 mono; 2 L R; 3 L R C; 4 L R Ls Rs; 5 L R C Ls Rs; 6 L R C LFE Ls Rs
// (5.1); 7 L R C LFE Cb Ls Rs; 8 L R C LFE Lb Rb Ls Rs (7.1 in channel-mask
// order). Other counts get "Ch1".."ChN", weighted as front channels.
func DefaultLayout(channels int) []string {
	switch channels {
	case 1:
		return []string{Mono}
	case 2:
		return []string{FrontLeft, FrontRight}
	case 3:
		return []string{FrontLeft, FrontRight, FrontCenter}
	case 4:
		return []string{FrontLeft, FrontRight, SurroundLeft, SurroundRight}
	case 5:
		return []string{FrontLeft, FrontRight, FrontCenter, SurroundLeft, SurroundRight}
	case 6:
		return []string{FrontLeft, FrontRight, FrontCenter, LowFrequency, SurroundLeft, SurroundRight}
	case 7:
		return []string{FrontLeft, FrontRight, FrontCenter, LowFrequency, BackCenter, SurroundLeft, SurroundRight}
	case 8:
		return []string{FrontLeft, FrontRight, FrontCenter, LowFrequency, BackLeft, BackRight, SurroundLeft, SurroundRight}
	}
	labels := make([]string, channels)
	for i := range labels {
		labels[i] = fmt.Sprintf("Ch%d", i+1)
	}
	return labels
}

// KnownLabel reports whether label is one of the position labels above (or
// a generic "Ch<n>").
func KnownLabel(label string) bool {
	if label == Mono {
		return true
	}
	for _, l := range maskLabels {
		if l == label {
			return true
		}
	}
	var n int
	_, err := fmt.Sscanf(label, "Ch%d", &n)
	return err == nil && n > 0 && fmt.Sprintf("Ch%d", n) == label
}

// layoutPresets are the names ParseLayout accepts besides a label list.
var layoutPresets = map[string][]string{
	"mono":   DefaultLayout(1),
	"stereo": DefaultLayout(2),
	"5.0":    DefaultLayout(5),
	"5.1":    DefaultLayout(6),
	"7.1":    DefaultLayout(8),
}

// ParseLayout reads a user-given layout: a preset name (mono, stereo, 5.0,
// 5.1, 7.1) or a comma-separated list of labels in stream order, e.g.
// "L,R,C,LFE,Ls,Rs" or "L,C,R,Ls,Rs,LFE".
func ParseLayout(s string) ([]string, error) {
	s = strings.TrimSpace(s)
	if p, ok := layoutPresets[strings.ToLower(s)]; ok {
		return append([]string(nil), p...), nil
	}
	parts := strings.Split(s, ",")
	labels := make([]string, 0, len(parts))
	seen := map[string]bool{}
	for _, p := range parts {
		p = strings.TrimSpace(p)
		if !KnownLabel(p) {
			return nil, fmt.Errorf("layout %q: unknown channel label %q (known: M L R C LFE Ls Rs Lb Rb Lc Rc Cb Tc Tfl Tfc Tfr Tbl Tbc Tbr Ch<n>, or a preset: mono, stereo, 5.0, 5.1, 7.1)", s, p)
		}
		if seen[p] {
			return nil, fmt.Errorf("layout %q: channel label %q appears twice", s, p)
		}
		seen[p] = true
		labels = append(labels, p)
	}
	return labels, nil
}
