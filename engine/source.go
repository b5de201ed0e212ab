package engine

import (
	"context"
	"fmt"
	"io"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// JudgeSource is JudgeTarget for a file whose bytes are not at its name: a
// copy fetched from a queue's object store, say. src is read from the
// start; t.Path names the record and every error message, exactly as if
// the file had been opened there, and t.Explicit decides whether a file
// that is not audio is skipped. Without Options.Spec the folder spec is
// looked for at t.Path.
func JudgeSource(ctx context.Context, t Target, src decode.Source, opt Options) Record {
	return judge(ctx, t, opt, func(mo measure.Options) *measure.Measurement {
		if t.Err != nil {
			return &measure.Measurement{Path: t.Path, Error: fmt.Sprintf("%s: %v", t.Path, t.Err), Err: t.Err, Notes: []string{}}
		}
		d, err := decode.NewWith(src, mo.Decode)
		if err != nil {
			// As decode.OpenWith names the file.
			err = fmt.Errorf("%s: %w", t.Path, err)
			return &measure.Measurement{Path: t.Path, Error: err.Error(), Err: err, Notes: []string{}}
		}
		if c, ok := d.(io.Closer); ok {
			defer c.Close() // a decoder with a child process (the ffmpeg bridge)
		}
		return measure.Stream(ctx, t.Path, d, mo)
	})
}
