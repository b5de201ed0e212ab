package opus

import "github.com/kweigh/kweigh/decode"

func init() {
	decode.Register(decode.Format{
		Name:       "opus",
		Extensions: []string{"opus"},
		Match:      Match,
		New: func(src decode.Source, size int64, _ decode.Options) (decode.Decoder, error) {
			d, err := New(src, size)
			if err != nil {
				return nil, err
			}
			return d, nil
		},
	})
}
