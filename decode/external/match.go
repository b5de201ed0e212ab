package external

import (
	"bytes"
	"encoding/binary"
	"io"
)

// Kind is a container the bridge recognises by its magic bytes.
type Kind string

// The containers the bridge recognises.
const (
	MP4      Kind = "mp4"      // ISO base media file (MP4, M4A)
	MOV      Kind = "mov"      // QuickTime movie
	MXF      Kind = "mxf"      // SMPTE ST 377-1 Material eXchange Format
	Vorbis   Kind = "ogg"      // Ogg stream whose first packet is a Vorbis header
	AC3      Kind = "ac3"      // raw ATSC A/52 (AC-3) bitstream
	EAC3     Kind = "eac3"     // raw ATSC A/52 Annex E (E-AC-3) bitstream
	ADTS     Kind = "aac"      // AAC in ADTS frames (ISO/IEC 13818-7)
	Matroska Kind = "matroska" // Matroska or WebM (EBML)
)

// describe names each kind for people.
var describe = map[Kind]string{
	MP4:      "MP4/M4A",
	MOV:      "QuickTime (MOV)",
	MXF:      "MXF",
	Vorbis:   "Ogg Vorbis",
	AC3:      "AC-3",
	EAC3:     "E-AC-3",
	ADTS:     "ADTS AAC",
	Matroska: "Matroska/WebM",
}

// String returns the kind's name for people.
func (k Kind) String() string { return describe[k] }

// mxfPartitionKey is the first 13 bytes of every MXF partition pack key
// (SMPTE ST 377-1, section 7.1: 06.0E.2B.34.02.05.01.01.0D.01.02.01.01).
var mxfPartitionKey = []byte{0x06, 0x0E, 0x2B, 0x34, 0x02, 0x05, 0x01, 0x01, 0x0D, 0x01, 0x02, 0x01, 0x01}

// maxRunIn is the longest run-in before an MXF header partition
// (SMPTE ST 377-1, section 6.5: less than 65536 bytes).
const maxRunIn = 65535

// Detect returns the container kind of the content, or "" when it is none
// the bridge knows. It reads at most 64 KiB and never panics.
func Detect(r io.ReaderAt, size int64) Kind {
	head := make([]byte, min(size, 16384))
	n, _ := r.ReadAt(head, 0)
	head = head[:n]
	switch {
	case len(head) < 12:
		return ""
	case ownedElsewhere(head):
		return ""
	case isISOBMFF(head):
		if bytes.Equal(head[4:8], []byte("ftyp")) && bytes.Equal(head[8:12], []byte("qt  ")) {
			return MOV
		}
		if !bytes.Equal(head[4:8], []byte("ftyp")) {
			return MOV // old QuickTime files start with moov, wide or mdat
		}
		return MP4
	case bytes.HasPrefix(head, []byte{0x1A, 0x45, 0xDF, 0xA3}):
		return Matroska
	case bytes.HasPrefix(head, []byte("OggS")):
		if isOggVorbis(head) {
			return Vorbis
		}
		return ""
	case isADTS(head):
		return ADTS
	}
	if k := ac3Kind(head); k != "" {
		return k
	}
	if isMXF(r, size, head) {
		return MXF
	}
	return ""
}

// isISOBMFF checks the first box (ISO/IEC 14496-12 section 4.2; QuickTime
// File Format: atoms): a known top-level type with a plausible size, and for
// the weak types (free, skip, wide, mdat) a second known box after it.
func isISOBMFF(b []byte) bool {
	typ := string(b[4:8])
	size := int64(binary.BigEndian.Uint32(b[0:4]))
	switch typ {
	case "ftyp":
		return size >= 8 && size <= 4096
	case "moov":
		return size >= 8 || size == 1
	case "free", "skip", "wide", "mdat", "pnot":
		if size < 8 || size+8 > int64(len(b)) {
			return false
		}
		next := string(b[size+4 : size+8])
		switch next {
		case "moov", "mdat", "free", "skip", "wide", "ftyp", "pnot", "PICT":
			return true
		}
	}
	return false
}

// isOggVorbis checks that the first Ogg page (RFC 3533 section 6) starts a
// packet that begins with the Vorbis identification header
// (Vorbis I specification, section 4.2.2: 0x01 "vorbis").
func isOggVorbis(b []byte) bool {
	if len(b) < 27 || b[4] != 0 {
		return false
	}
	start := 27 + int(b[26])
	return len(b) >= start+7 && bytes.Equal(b[start:start+7], []byte("\x01vorbis"))
}

// adtsFrame returns the length of the ADTS frame at b[off:] (ISO/IEC
// 13818-7 section 6.2: 12-bit syncword 0xFFF, layer 00, 13-bit
// frame_length), or 0 when there is none.
func adtsFrame(b []byte, off int) int {
	if off+7 > len(b) || b[off] != 0xFF || b[off+1]&0xF6 != 0xF0 {
		return 0
	}
	if (b[off+2]>>2)&0x0F > 12 { // sampling_frequency_index 13–15 are reserved
		return 0
	}
	n := int(b[off+3]&0x03)<<11 | int(b[off+4])<<3 | int(b[off+5])>>5
	if n < 7 {
		return 0
	}
	return n
}

// isADTS requires two ADTS frames in a row (or one that fills a short file).
func isADTS(b []byte) bool {
	n := adtsFrame(b, 0)
	if n == 0 {
		return false
	}
	if n >= len(b) {
		return n == len(b)
	}
	return adtsFrame(b, n) != 0
}

// ac3Kind checks the A/52 sync word 0x0B77 (ATSC A/52:2018 section 5.3)
// with a valid bit-stream id (0–8 AC-3, 11–16 E-AC-3, section E.1) and a
// second sync word with the same id within the first 8 KiB.
func ac3Kind(b []byte) Kind {
	bsid := func(off int) int {
		if off+6 > len(b) || b[off] != 0x0B || b[off+1] != 0x77 {
			return -1
		}
		return int(b[off+5] >> 3)
	}
	id := bsid(0)
	var k Kind
	switch {
	case id >= 0 && id <= 8:
		k = AC3
	case id >= 11 && id <= 16:
		k = EAC3
	default:
		return ""
	}
	for off := 2; off+6 <= min(len(b), 8192); off++ {
		if bsid(off) == id {
			return k
		}
	}
	return ""
}

// isMXF looks for a partition pack key at the start or after a run-in.
func isMXF(r io.ReaderAt, size int64, head []byte) bool {
	if bytes.HasPrefix(head, mxfPartitionKey) {
		return true
	}
	if len(head) < 16384 { // the whole file is in head
		return bytes.Contains(head, mxfPartitionKey)
	}
	buf := make([]byte, min(size, maxRunIn+int64(len(mxfPartitionKey))))
	n, _ := r.ReadAt(buf, 0)
	return bytes.Contains(buf[:n], mxfPartitionKey)
}

// ownedElsewhere reports content that kweigh's own decoders read (WAV and
// its 64-bit variants, AIFF, FLAC, MP3 with an ID3v2 tag): the bridge never
// claims it, whatever order the formats are tried in.
func ownedElsewhere(b []byte) bool {
	for _, magic := range []string{"RIFF", "RF64", "BW64", "FORM", "fLaC", "ID3"} {
		if bytes.HasPrefix(b, []byte(magic)) {
			return true
		}
	}
	return false
}
