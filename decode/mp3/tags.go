package mp3

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
)

// Metadata tags are not MPEG frames: an MP3 file may start with ID3v2 tags
// and end with APEv2, Lyrics3v2, an appended ID3v2 (with footer) and ID3v1.
// audioBounds finds the byte range between them so that neither the sniffer
// nor the decoder ever parses tag bytes as audio. Layouts from the public
// ID3v2.3/2.4, ID3v1, APEv2 and Lyrics3v2 descriptions [desc].
const (
	id3v2HeaderLen  = 10
	id3v2FooterFlag = 0x10 // ID3v2.4: a 10-byte footer follows the tag
	id3v1Len        = 128
	apeFooterLen    = 32
	apeHasHeader    = 1 << 31
	lyrics3EndLen   = 15 // 6-digit size + "LYRICS200"
)

// audioBounds returns the offset of the first byte after the leading ID3v2
// tags and the offset just past the last byte before the trailing tags of a
// size-byte file. It never fails: unreadable or implausible tags are left in
// place for the frame parser to reject.
func audioBounds(r io.ReaderAt, size int64) (start, end int64) {
	start, end, _ = taggedBounds(r, size)
	return start, end
}

// taggedBounds is audioBounds that also names the tags it stepped over, in
// file order, as decode.Info.Tags lists them: "id3v2.3" (with the tag's
// major version), "ape", "lyrics3v2", "id3v1".
func taggedBounds(r io.ReaderAt, size int64) (start, end int64, tags []string) {
	for start < size {
		n, version, ok := id3v2Len(r, start, size)
		if !ok {
			break
		}
		tags = append(tags, fmt.Sprintf("id3v2.%d", version))
		start += n
	}
	end = size
	var trailing []string
	for end > start {
		n, name := trailingTagLen(r, start, end)
		if n == 0 {
			break
		}
		trailing = append(trailing, name)
		end -= n
	}
	for i := len(trailing) - 1; i >= 0; i-- {
		tags = append(tags, trailing[i])
	}
	return start, end, tags
}

// id3v2Len returns the full length and the major version of an ID3v2 tag
// that starts at off.
func id3v2Len(r io.ReaderAt, off, size int64) (int64, int, bool) {
	var h [id3v2HeaderLen]byte
	if _, err := r.ReadAt(h[:], off); err != nil {
		return 0, 0, false
	}
	if string(h[:3]) != "ID3" || h[3] == 0xFF || h[4] == 0xFF {
		return 0, 0, false
	}
	n, ok := syncsafe(h[6:10])
	if !ok {
		return 0, 0, false
	}
	n += id3v2HeaderLen
	if h[5]&id3v2FooterFlag != 0 {
		n += id3v2HeaderLen
	}
	if off+n > size {
		return 0, 0, false
	}
	return n, int(h[3]), true
}

// syncsafe decodes a 28-bit ID3v2 size stored 7 bits per byte.
func syncsafe(b []byte) (int64, bool) {
	var n int64
	for _, c := range b {
		if c >= 0x80 {
			return 0, false
		}
		n = n<<7 | int64(c)
	}
	return n, true
}

// trailingTagLen returns the length and the name of the tag that ends at
// end, or 0.
func trailingTagLen(r io.ReaderAt, start, end int64) (int64, string) {
	avail := end - start
	var tail [apeFooterLen]byte
	if avail >= id3v1Len {
		if _, err := r.ReadAt(tail[:3], end-id3v1Len); err == nil && string(tail[:3]) == "TAG" {
			return id3v1Len, "id3v1"
		}
	}
	if avail >= apeFooterLen {
		if _, err := r.ReadAt(tail[:], end-apeFooterLen); err == nil && string(tail[:8]) == "APETAGEX" {
			n := int64(binary.LittleEndian.Uint32(tail[12:16]))
			if binary.LittleEndian.Uint32(tail[20:24])&apeHasHeader != 0 {
				n += apeFooterLen
			}
			if n >= apeFooterLen && n <= avail {
				return n, "ape"
			}
		}
	}
	if avail >= lyrics3EndLen {
		if _, err := r.ReadAt(tail[:lyrics3EndLen], end-lyrics3EndLen); err == nil &&
			string(tail[6:lyrics3EndLen]) == "LYRICS200" {
			if n, ok := decimal(tail[:6]); ok && n+lyrics3EndLen <= avail {
				return n + lyrics3EndLen, "lyrics3v2"
			}
		}
	}
	if avail >= id3v2HeaderLen {
		if _, err := r.ReadAt(tail[:id3v2HeaderLen], end-id3v2HeaderLen); err == nil &&
			bytes.Equal(tail[:3], []byte("3DI")) {
			if n, ok := syncsafe(tail[6:10]); ok && n+2*id3v2HeaderLen <= avail {
				return n + 2*id3v2HeaderLen, fmt.Sprintf("id3v2.%d", tail[3])
			}
		}
	}
	return 0, ""
}

// decimal parses ASCII digits.
func decimal(b []byte) (int64, bool) {
	var n int64
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, false
		}
		n = n*10 + int64(c-'0')
	}
	return n, true
}
