package wav

import (
	"encoding/binary"
	"io"
)

// ds64 is the data-size chunk of RF64 (EBU Tech 3306) and BW64 (ITU-R
// BS.2088): the 64-bit sizes that do not fit the 32-bit size fields, which
// then hold 0xFFFFFFFF.
type ds64 struct {
	riffSize    uint64
	dataSize    uint64
	sampleCount uint64
	table       map[[4]byte]uint64 // sizes of other oversized chunks
}

const (
	// ds64FixedSize is riffSize, dataSize, sampleCount (each a low and a
	// high uint32) and the uint32 table length.
	ds64FixedSize = 28
	// ds64EntrySize is one table entry: chunk ID, size low, size high.
	ds64EntrySize = 12
	// maxDS64Entries bounds the table read; real files have none or one.
	maxDS64Entries = 256
)

// sizeSeeDS64 in a 32-bit size field means "the size is in the ds64 chunk".
const sizeSeeDS64 = 0xFFFFFFFF

// readDS64 reads a ds64 chunk body of the given size at offset off. The
// caller has checked that the body lies inside the file.
func readDS64(r io.ReaderAt, off int64, size uint64, e chunkErrors) (*ds64, error) {
	if size < ds64FixedSize {
		return nil, e.bad(0, "ds64 chunk is %d bytes long, at least %d are needed", size, ds64FixedSize)
	}
	var fixed [ds64FixedSize]byte
	if err := readFull(r, fixed[:], off); err != nil {
		return nil, e.wrap(0, err, "reading ds64 chunk")
	}
	le := binary.LittleEndian
	d := &ds64{
		riffSize:    le.Uint64(fixed[0:]),
		dataSize:    le.Uint64(fixed[8:]),
		sampleCount: le.Uint64(fixed[16:]),
	}
	entries := uint64(le.Uint32(fixed[24:]))
	entries = min(entries, (size-ds64FixedSize)/ds64EntrySize, maxDS64Entries)
	if entries == 0 {
		return d, nil
	}
	table := make([]byte, entries*ds64EntrySize)
	if err := readFull(r, table, off+ds64FixedSize); err != nil {
		return nil, e.wrap(ds64FixedSize, err, "reading ds64 table")
	}
	d.table = make(map[[4]byte]uint64, entries)
	for i := 0; i+ds64EntrySize <= len(table); i += ds64EntrySize {
		d.table[[4]byte(table[i:])] = le.Uint64(table[i+4:])
	}
	return d, nil
}

// readFull reads exactly len(buf) bytes at off; a short read is
// io.ErrUnexpectedEOF.
func readFull(r io.ReaderAt, buf []byte, off int64) error {
	n, err := r.ReadAt(buf, off)
	if n == len(buf) {
		return nil
	}
	if err == nil || err == io.EOF {
		err = io.ErrUnexpectedEOF
	}
	return err
}
