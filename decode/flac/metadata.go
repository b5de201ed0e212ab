package flac

import (
	"bufio"
	"crypto/md5"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"strings"
)

// Metadata block types (RFC 9639, section 8.1).
const (
	blockStreamInfo    = 0
	blockSeekTable     = 3
	blockVorbisComment = 4
	blockInvalid       = 127
)

// maxMetadataBlocks bounds the metadata walk of a damaged file.
const maxMetadataBlocks = 1 << 12

// streamInfo is the STREAMINFO block (RFC 9639, section 8.2).
type streamInfo struct {
	minBlock, maxBlock int
	minFrame, maxFrame int // bytes, 0 = unknown
	sampleRate         int
	channels           int
	bits               int
	samples            uint64 // per channel, 0 = unknown
	md5                [md5.Size]byte
}

// parseStreamInfo decodes the 34 bytes of a STREAMINFO body.
func parseStreamInfo(b []byte) streamInfo {
	var si streamInfo
	si.minBlock = int(binary.BigEndian.Uint16(b[0:]))
	si.maxBlock = int(binary.BigEndian.Uint16(b[2:]))
	si.minFrame = int(b[4])<<16 | int(b[5])<<8 | int(b[6])
	si.maxFrame = int(b[7])<<16 | int(b[8])<<8 | int(b[9])
	// 20 bits rate, 3 bits channels - 1, 5 bits bits - 1, 36 bits samples.
	v := binary.BigEndian.Uint64(b[10:])
	si.sampleRate = int(v >> 44)
	si.channels = int(v>>41&7) + 1
	si.bits = int(v>>36&31) + 1
	si.samples = v & (1<<36 - 1)
	copy(si.md5[:], b[18:34])
	return si
}

// metadata is what the decoder takes from the metadata blocks.
type metadata struct {
	info       streamInfo
	audioStart int64 // offset of the first frame
	maskValue  string
	maskFound  bool
	commentErr error // the Vorbis comment could not be read
	seekAt     int64 // offset of the SEEKTABLE body, 0 if none
	seekPoints int64 // its number of 18-byte seek points
}

// readMetadata walks the metadata blocks that follow the "fLaC" signature
// at start (RFC 9639, section 8: each block a 1-bit last-block flag, 7-bit
// type and 24-bit length, then the body). Block bodies are read only where
// needed (STREAMINFO, the Vorbis comment), through r, so a block of any
// declared length costs no memory; a length that runs past the end of the
// file is an error.
func readMetadata(r io.ReaderAt, start, size int64) (*metadata, error) {
	md := &metadata{}
	off := start + int64(len(signature))
	for i := range maxMetadataBlocks {
		var head [4]byte
		if n, _ := r.ReadAt(head[:], off); n < len(head) {
			return nil, &metadataError{off, "the file ends inside the metadata blocks", io.ErrUnexpectedEOF}
		}
		last := head[0]&0x80 != 0
		typ := head[0] & 0x7F
		length := int64(head[1])<<16 | int64(head[2])<<8 | int64(head[3])
		body := off + 4
		switch {
		case i == 0 && typ != blockStreamInfo:
			return nil, &metadataError{off, fmt.Sprintf("the first metadata block is of type %d; it must be STREAMINFO (0)", typ), nil}
		case i == 0 && length != 34:
			return nil, &metadataError{off, fmt.Sprintf("STREAMINFO is %d bytes long; it must be 34", length), nil}
		case i > 0 && typ == blockStreamInfo:
			return nil, &metadataError{off, "a second STREAMINFO block", nil}
		case typ == blockInvalid:
			return nil, &metadataError{off, "metadata block type 127 (invalid)", nil}
		case body+length > size:
			return nil, &metadataError{off, fmt.Sprintf("metadata block of type %d declares %d bytes, the file ends %d bytes after its header", typ, length, size-body), io.ErrUnexpectedEOF}
		}
		switch typ {
		case blockStreamInfo:
			var b [34]byte
			if n, _ := r.ReadAt(b[:], body); n < len(b) {
				return nil, &metadataError{body, "the file ends inside STREAMINFO", io.ErrUnexpectedEOF}
			}
			md.info = parseStreamInfo(b[:])
		case blockSeekTable:
			if md.seekAt == 0 {
				md.seekAt, md.seekPoints = body, length/seekPointSize
			}
		case blockVorbisComment:
			if !md.maskFound && md.commentErr == nil {
				md.maskValue, md.maskFound, md.commentErr = findTag(io.NewSectionReader(r, body, length), maskTag)
			}
		}
		off = body + length
		if last {
			md.audioStart = off
			return md, nil
		}
	}
	return nil, &metadataError{off, fmt.Sprintf("more than %d metadata blocks", maxMetadataBlocks), nil}
}

// metadataError locates a problem in the metadata blocks.
type metadataError struct {
	offset  int64
	problem string
	err     error
}

func (e *metadataError) Error() string { return e.problem }

// maxTagLength bounds the comments findTag reads into memory; longer ones
// (embedded pictures, lyrics) are skipped unread, since no channel mask
// is that long.
const maxTagLength = 1 << 10

// findTag returns the value of the first comment called name (compared
// without regard to case) in a Vorbis comment block body (RFC 9639, section
// 8.6, and the Vorbis I comment header: little-endian 32-bit lengths, a
// vendor string, a count, then NAME=value strings).
func findTag(body *io.SectionReader, name string) (value string, found bool, err error) {
	in := bufio.NewReaderSize(body, 512)
	remaining := body.Size()
	readU32 := func(what string) (int64, error) {
		var b [4]byte
		if _, err := io.ReadFull(in, b[:]); err != nil {
			return 0, fmt.Errorf("the block ends inside the %s", what)
		}
		remaining -= 4
		return int64(binary.LittleEndian.Uint32(b[:])), nil
	}
	readLen := func(what string) (int64, error) {
		n, err := readU32(what + " length")
		if err == nil && n > remaining {
			err = fmt.Errorf("the %s declares %d bytes, the block has %d left", what, n, remaining)
		}
		return n, err
	}
	skip := func(n int64) error {
		_, err := in.Discard(int(n))
		remaining -= n
		return err
	}
	vendor, err := readLen("vendor string")
	if err != nil {
		return "", false, err
	}
	if err := skip(vendor); err != nil {
		return "", false, err
	}
	count, err := readU32("comment count")
	if err != nil {
		return "", false, err
	}
	if count > remaining/4 {
		return "", false, fmt.Errorf("the block declares %d comments, it has room for %d", count, remaining/4)
	}
	buf := make([]byte, 0, 64)
	for i := range count {
		n, err := readLen(fmt.Sprintf("comment %d", i))
		if err != nil {
			return "", false, err
		}
		if n > maxTagLength {
			if err := skip(n); err != nil {
				return "", false, err
			}
			continue
		}
		buf = buf[:n]
		if _, err := io.ReadFull(in, buf); err != nil {
			return "", false, errors.New("the block ends inside a comment")
		}
		remaining -= n
		key, val, ok := strings.Cut(string(buf), "=")
		if !ok {
			return "", false, fmt.Errorf("comment %d has no '=' between name and value", i)
		}
		if strings.EqualFold(key, name) {
			return val, true, nil
		}
	}
	return "", false, nil
}
