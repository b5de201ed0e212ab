package serve

import (
	"context"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"

	// Every format kweigh reads: an upload is detected by its content.
	_ "github.com/kweigh/kweigh/decode/formats"
)

// Judge measures one decoded upload and judges it against spec. name is
// the upload's label (the client's file name, never a path the server
// opens). It never returns nil: a stream that cannot be measured gives a
// Result with verdict error. Cancelling ctx stops the measurement between
// blocks.
//
// The server takes it as a function so the front end stays independent of
// how a file is judged; DefaultJudge is the library's own pipeline.
type Judge func(ctx context.Context, name string, d decode.Decoder, spec *rules.Spec) *rules.Result

// DefaultJudge measures with measure.Stream, keeping the 10 Hz series for
// the HTML report's plots, and judges with rules.Evaluate.
func DefaultJudge(ctx context.Context, name string, d decode.Decoder, spec *rules.Spec) *rules.Result {
	m := measure.Stream(ctx, name, d, measure.Options{KeepSeries: true})
	r := rules.Evaluate(spec, m)
	return &r
}
