package serve

import (
	"context"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/engine"
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

// DefaultJudge is the engine's judgement of one stream (what `kweigh
// check` does for a file), keeping the 10 Hz series for the HTML report's
// plots.
func DefaultJudge(ctx context.Context, name string, d decode.Decoder, spec *rules.Spec) *rules.Result {
	rec := engine.JudgeStream(ctx, name, d, engine.Options{Spec: spec, Measure: measure.Options{KeepSeries: true}})
	return rec.Result
}
