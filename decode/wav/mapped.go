package wav

import (
	"fmt"
	"io"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/filemap"
)

// readMapped is ReadFrames for a decoder whose audio is mapped (d.view):
// the samples are converted straight from the page cache, with no copy of
// the raw bytes. A file that shrinks while mapped (a fault on a page past
// its new end, or a size found short at the end) ends the audio there with
// a *decode.IntegrityError naming the file and the byte, like a short
// read; a window that cannot be mapped hands over to the read calls.
func (d *decoder) readMapped(dst []float64) (int, error) {
	want := int64(len(dst) / d.channels)
	ch := int64(d.channels)
	var frames int64
	for frames < want && d.pos < d.readable {
		n := min(want-frames, (d.readable-d.pos)/d.blockAlign, filemap.MaxStep/d.blockAlign)
		raw, err := d.view.Bytes(d.dataOffset+d.pos, int(n*d.blockAlign), int(d.blockAlign))
		if err != nil {
			// No mapping here (address space, a system limit): read calls
			// take over from this frame with the same results.
			d.dropView()
			more, err := d.ReadFrames(dst[frames*ch:])
			return int(frames) + more, err
		}
		k := int64(len(raw)) / d.blockAlign
		raw = raw[:k*d.blockAlign]
		out := dst[frames*ch : (frames+k)*ch]
		if at, faulted := d.view.Guard(func() { d.convert(out, raw) }); faulted {
			// The page at is gone: the file ends before it now. Convert
			// again up to the new end (the loop goes on with a smaller
			// d.readable).
			d.shrunk(filemap.PageStart(at))
			continue
		}
		d.pos += k * d.blockAlign
		frames += k
	}
	if d.pos >= d.readable {
		// The last page of a file cut short inside it reads as zeros
		// rather than faulting: the size now tells.
		if size, err := d.view.Size(); err == nil && size < d.dataOffset+d.readable {
			d.shrunk(size)
		}
		d.dropView()
		d.err = io.EOF
		if d.damage != nil {
			return int(frames), d.damage
		}
		if frames == 0 {
			return 0, io.EOF
		}
	}
	return int(frames), nil
}

// shrunk ends the readable audio where the file ends now (at most limit:
// the start of the page a fault found gone) and records the damage. When
// the file now ends before what was already delivered (cut behind the
// reader, or inside the page being read, whose rest reads as zeros), the
// audio stops where it is and the damage says which delivered bytes the
// file no longer holds.
func (d *decoder) shrunk(limit int64) {
	if size, err := d.view.Size(); err == nil {
		limit = min(limit, size)
	}
	audio := max(limit-d.dataOffset, 0)
	whole := audio - audio%d.blockAlign
	if whole >= d.pos {
		d.readable = min(d.readable, whole)
		d.damage = &decode.IntegrityError{Format: d.info.Container, Offset: d.dataOffset + whole, Problem: fmt.Sprintf(
			"%s shrank to %d bytes while being read (truncated or replaced?): audio truncated at byte %d",
			d.view.Name(), limit, d.dataOffset+whole)}
		return
	}
	d.readable = d.pos
	d.damage = &decode.IntegrityError{Format: d.info.Container, Offset: limit, Problem: fmt.Sprintf(
		"%s shrank to %d bytes while being read (truncated or replaced?): it no longer holds the audio delivered from byte %d to %d",
		d.view.Name(), limit, max(limit, d.dataOffset), d.dataOffset+d.pos)}
}

// dropView unmaps the audio; later reads, if any, use read calls.
func (d *decoder) dropView() {
	if d.view != nil {
		d.view.Close()
		d.view = nil
	}
}

// Close unmaps the audio (decode.File.Close calls it before closing the
// file). A decoder that reads to its end unmaps by itself, and one dropped
// unread is unmapped when it is collected (see mapAudio).
func (d *decoder) Close() error {
	d.dropView()
	return nil
}
