package flac

import (
	"bufio"
	"io"
)

// positionReader counts the bytes read from the file so that errors can
// name the offset of the frame they concern.
type positionReader struct {
	r   io.Reader
	off int64
}

func (p *positionReader) Read(b []byte) (int, error) {
	n, err := p.r.Read(b)
	p.off += int64(n)
	return n, err
}

// bufferSize is the read buffer given to mewkiz/flac. flac.New wraps its
// reader in bufio.NewReader, which reuses a *bufio.Reader of at least 4096
// bytes as it is; handing it ours keeps the byte count exact.
const bufferSize = 64 << 10

// countedReader is a buffered reader whose logical position is known.
type countedReader struct {
	*bufio.Reader
	raw *positionReader
}

func newCountedReader(r io.Reader, start int64) *countedReader {
	raw := &positionReader{r: r, off: start}
	return &countedReader{Reader: bufio.NewReaderSize(raw, bufferSize), raw: raw}
}

// offset is the file offset of the next byte the library will read.
func (c *countedReader) offset() int64 { return c.raw.off - int64(c.Buffered()) }
