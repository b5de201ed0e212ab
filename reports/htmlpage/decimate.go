package htmlpage

import "math"

// Column is the extent of one drawn column of a decimated series: the
// smallest and largest finite value among the series elements [Start, End).
type Column struct {
	Start, End int
	Min, Max   float32
	// MinFirst is true when the minimum occurs before the maximum, so a
	// line drawn through the column visits them in time order.
	MinFirst bool
	// Valid is false when the column holds no finite value: every element
	// is NaN (window not yet full) or -Inf (digital silence). Such a column
	// is drawn as a gap, never as a value.
	Valid bool
}

// Decimate reduces series to at most columns columns of (nearly) equal
// length and keeps each column's minimum and maximum, so peaks and dips
// survive any reduction: a single element above everything else still sets
// its column's Max. Non-finite elements (NaN, ±Inf) are skipped; a column of
// only such elements is not Valid. A series no longer than columns gets one
// column per element. Decimate panics if columns < 1.
func Decimate(series []float32, columns int) []Column {
	if columns < 1 {
		panic("htmlpage: Decimate needs at least one column")
	}
	n := len(series)
	if n < columns {
		columns = n
	}
	out := make([]Column, columns)
	for c := range out {
		// Integer bounds: column c holds elements [c·n/columns, (c+1)·n/columns).
		start, end := c*n/columns, (c+1)*n/columns
		col := Column{Start: start, End: end}
		minAt, maxAt := -1, -1
		for i := start; i < end; i++ {
			v := series[i]
			if math.IsNaN(float64(v)) || math.IsInf(float64(v), 0) {
				continue
			}
			if minAt < 0 || v < col.Min {
				col.Min, minAt = v, i
			}
			if maxAt < 0 || v > col.Max {
				col.Max, maxAt = v, i
			}
		}
		col.Valid = minAt >= 0
		col.MinFirst = minAt <= maxAt
		out[c] = col
	}
	return out
}
