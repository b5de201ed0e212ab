package opus

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
)

// crcTable is the Ogg page checksum table: CRC-32 with polynomial
// 0x04C11DB7, not reflected, initial value 0 (RFC 3533 section 6).
var crcTable = func() (t [256]uint32) {
	for i := range t {
		r := uint32(i) << 24
		for range 8 {
			if r&0x80000000 != 0 {
				r = r<<1 ^ 0x04C11DB7
			} else {
				r <<= 1
			}
		}
		t[i] = r
	}
	return t
}()

func oggCRC(crc uint32, b []byte) uint32 {
	for _, c := range b {
		crc = crc<<8 ^ crcTable[byte(crc>>24)^c]
	}
	return crc
}

// Page header flags (RFC 3533 section 6).
const (
	flagContinued = 0x01
	flagBOS       = 0x02
	flagEOS       = 0x04
)

// page is one Ogg page.
type page struct {
	offset  int64 // byte offset of "OggS"
	flags   byte
	granule int64
	serial  uint32
	seq     uint32
	lacing  []byte
	body    []byte
}

// errBadCRC marks a page whose checksum does not match.
var errBadCRC = errors.New("page checksum mismatch")

// readPage reads the page at off. It returns io.EOF at the clean end of the
// file and io.ErrUnexpectedEOF when the file ends inside a page.
func readPage(r io.ReaderAt, off, size int64) (*page, error) {
	if off >= size {
		return nil, io.EOF
	}
	var h [27]byte
	if _, err := r.ReadAt(h[:], off); err != nil {
		return nil, io.ErrUnexpectedEOF
	}
	if string(h[0:4]) != "OggS" {
		return nil, fmt.Errorf("no Ogg page capture pattern")
	}
	if h[4] != 0 {
		return nil, fmt.Errorf("Ogg stream structure version %d (only 0 exists)", h[4])
	}
	p := &page{
		offset:  off,
		flags:   h[5],
		granule: int64(binary.LittleEndian.Uint64(h[6:14])),
		serial:  binary.LittleEndian.Uint32(h[14:18]),
		seq:     binary.LittleEndian.Uint32(h[18:22]),
		lacing:  make([]byte, h[26]),
	}
	if _, err := r.ReadAt(p.lacing, off+27); err != nil {
		return nil, io.ErrUnexpectedEOF
	}
	n := 0
	for _, l := range p.lacing {
		n += int(l)
	}
	if off+27+int64(len(p.lacing))+int64(n) > size {
		return nil, io.ErrUnexpectedEOF
	}
	p.body = make([]byte, n)
	if _, err := r.ReadAt(p.body, off+27+int64(len(p.lacing))); err != nil {
		return nil, io.ErrUnexpectedEOF
	}
	crc := binary.LittleEndian.Uint32(h[22:26])
	clear(h[22:26])
	sum := oggCRC(0, h[:])
	sum = oggCRC(sum, p.lacing)
	sum = oggCRC(sum, p.body)
	if sum != crc {
		return p, errBadCRC
	}
	return p, nil
}

// size is the page's length in bytes.
func (p *page) size() int64 { return 27 + int64(len(p.lacing)) + int64(len(p.body)) }

// packets splits the page body into packets. partial is prepended to the
// first one (a packet continued from the previous page); the returned tail
// is the unfinished last packet, to be continued on the next page.
func (p *page) packets(partial []byte) (done [][]byte, tail []byte) {
	pos := 0
	cur := partial
	for _, l := range p.lacing {
		cur = append(cur, p.body[pos:pos+int(l)]...)
		pos += int(l)
		if l < 255 {
			done = append(done, cur)
			cur = nil
		}
	}
	return done, cur
}

// PageCRC returns the checksum of a whole Ogg page whose CRC field holds
// zeros, as RFC 3533 section 6 defines it.
func PageCRC(page []byte) uint32 { return oggCRC(0, page) }
