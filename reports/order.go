package reports

import (
	"cmp"
	"slices"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// SortMeasurements sorts ms by path, for a stable order in document formats
// whatever order the files finished in.
func SortMeasurements(ms []*measure.Measurement) {
	slices.SortStableFunc(ms, func(a, b *measure.Measurement) int {
		return cmp.Compare(measurementPath(a), measurementPath(b))
	})
}

// SortResults sorts rs by path, then spec, for a stable order in document
// formats whatever order the files finished in.
func SortResults(rs []*rules.Result) {
	slices.SortStableFunc(rs, func(a, b *rules.Result) int {
		return cmp.Or(
			cmp.Compare(measurementPath(a.Measurement), measurementPath(b.Measurement)),
			cmp.Compare(a.Spec, b.Spec))
	})
}

func measurementPath(m *measure.Measurement) string {
	if m == nil {
		return ""
	}
	return m.Path
}
