package flac

import "io"

// input is the sliding buffer frames are decoded from: the unread bytes of
// the file are buf[r:w]. fill tops it up with large reads, moving the
// unread tail to the front first, so memory stays at the buffer's size
// however long the file is; the buffer grows only for a frame larger than
// it (up to the frame size limit).
type input struct {
	src  io.Reader
	buf  []byte
	r, w int
	base int64 // file offset of buf[0]
	size int64 // file size
	eof  bool
	err  error // the read error that ended the input, if not io.EOF
}

// defaultBuffer is the initial buffer size: room for many frames of
// common streams (a 4096-sample stereo 24-bit frame is about 20 KB), so
// the tail moved by fill is small next to the bytes read.
const defaultBuffer = 256 << 10

func newInput(src io.Reader, start, size int64) *input {
	n := int64(defaultBuffer)
	if rest := size - start; rest < n {
		n = max(rest, 64)
	}
	return &input{src: src, buf: make([]byte, n), base: start, size: size}
}

// bytes returns the unread buffered bytes.
func (in *input) bytes() []byte { return in.buf[in.r:in.w] }

// offset returns the file offset of the first unread byte.
func (in *input) offset() int64 { return in.base + int64(in.r) }

// advance marks n buffered bytes as read.
func (in *input) advance(n int) { in.r += n }

// fill tries to buffer at least need unread bytes; at the end of the file
// there may be fewer (bytes tells). The buffer grows only when need exceeds
// it, and never beyond what is left of the file.
func (in *input) fill(need int) {
	if in.w-in.r >= need || in.eof {
		return
	}
	unread := in.size - (in.base + int64(in.w)) // bytes not yet read from src
	if unread <= 0 {
		in.eof = true
		return
	}
	have := int64(in.w - in.r)
	if int64(need) > have+unread {
		need = int(have + unread)
	}
	if in.r+need > len(in.buf) {
		if need > len(in.buf) {
			grown := make([]byte, max(need, int(min(int64(2*len(in.buf)), have+unread))))
			in.w = copy(grown, in.buf[in.r:in.w])
			in.buf = grown
		} else {
			in.w = copy(in.buf, in.buf[in.r:in.w])
		}
		in.base += int64(in.r)
		in.r = 0
	}
	for zeros := 0; in.w-in.r < need && !in.eof; {
		n, err := in.src.Read(in.buf[in.w:])
		in.w += n
		switch {
		case err == io.EOF:
			in.eof = true
		case err != nil:
			in.eof, in.err = true, err
		case n == 0:
			if zeros++; zeros > 100 {
				in.eof, in.err = true, io.ErrNoProgress
			}
		}
	}
	if in.base+int64(in.w) >= in.size {
		in.eof = true
	}
}
