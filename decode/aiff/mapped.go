package aiff

import (
	"fmt"

	"github.com/kweigh/kweigh/internal/filemap"
)

// mapSound makes d convert from view when there is one (nil: read calls).
func (d *Decoder) mapSound(view *filemap.View) {
	d.view = view
	filemap.UnmapWhenCollected(d, view)
}

// readMapped converts up to want frames into dst straight from the
// mapping of the sound data (no copy of the raw bytes) and returns the
// frames it converted. A file that shrinks while mapped (a fault on a page
// past its new end, or a size found short at the end) ends the sound data
// there, as a short read does, with the reason naming the file (see
// shrunk); a window that cannot be mapped hands over to the read calls.
func (d *Decoder) readMapped(dst []float64, want int64) int64 {
	ch := int64(d.h.channels)
	var n int64
	for n < want && d.pos < d.present {
		k := min(want-n, d.present-d.pos, filemap.MaxStep/d.frameBytes)
		raw, err := d.view.Bytes(d.h.dataOff+d.pos*d.frameBytes, int(k*d.frameBytes), int(d.frameBytes))
		if err != nil {
			// No mapping here (address space, a system limit): read calls
			// take over from this frame with the same results.
			d.dropView()
			return n + d.readCalls(dst[n*ch:], want-n)
		}
		k = int64(len(raw)) / d.frameBytes
		raw = raw[:k*d.frameBytes]
		out := dst[n*ch : (n+k)*ch]
		if at, faulted := d.view.Guard(func() { d.convert(out, raw) }); faulted {
			// The page at is gone: convert again up to the new end.
			d.shrunk(filemap.PageStart(at))
			continue
		}
		d.pos += k
		n += k
	}
	if d.pos >= d.present && d.view != nil {
		// The last page of a file cut short inside it reads as zeros
		// rather than faulting: the size now tells.
		if size, err := d.view.Size(); err == nil && size < d.h.dataOff+d.present*d.frameBytes {
			d.shrunk(size)
		}
		d.dropView()
	}
	return n
}

// shrunk ends the sound data where the file ends now (at most limit: the
// start of the page a fault found gone) and keeps the reason for the
// damage report. When the file now ends before what was already delivered
// (cut behind the reader, or inside the page being read, whose rest reads
// as zeros), the audio stops where it is and the reason says which
// delivered bytes the file no longer holds.
func (d *Decoder) shrunk(limit int64) {
	if size, err := d.view.Size(); err == nil {
		limit = min(limit, size)
	}
	frames := max(limit-d.h.dataOff, 0) / d.frameBytes
	if frames >= d.pos {
		d.present = min(d.present, frames)
		d.readErr = fmt.Errorf("%s shrank to %d bytes while being read (truncated or replaced?)", d.view.Name(), limit)
		return
	}
	d.readErr = fmt.Errorf("%s shrank to %d bytes while being read (truncated or replaced?): it no longer holds the audio delivered from byte %d to %d",
		d.view.Name(), limit, max(limit, d.h.dataOff), d.h.dataOff+d.pos*d.frameBytes)
	d.present = d.pos
}

// dropView unmaps the sound data; later reads, if any, use read calls.
func (d *Decoder) dropView() {
	if d.view != nil {
		d.view.Close()
		d.view = nil
	}
}

// Close unmaps the sound data (decode.File.Close calls it before closing
// the file). A decoder that reads to its end unmaps by itself.
func (d *Decoder) Close() error {
	d.dropView()
	return nil
}
