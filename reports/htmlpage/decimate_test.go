package htmlpage

import (
	"math"
	"testing"
)

// threeHours is the length of a three-hour programme in 10 Hz series
// elements.
const threeHours = 3 * 3600 * 10

// TestDecimateKeepsSpike: one 100 ms element (the block holding a 10 ms
// click) in a three-hour series must still set its column's maximum, and
// only that column's.
func TestDecimateKeepsSpike(t *testing.T) {
	for _, at := range []int{0, 1, 54_321, threeHours/2 + 7, threeHours - 1} {
		series := make([]float32, threeHours)
		for i := range series {
			series[i] = -31 + float32(i%7)*0.25 // programme between -31 and -29.5
		}
		series[at] = 0.4
		for _, columns := range []int{1200, PlotColumns, 333} {
			cols := Decimate(series, columns)
			if len(cols) != columns {
				t.Fatalf("%d columns, want %d", len(cols), columns)
			}
			hits := 0
			for _, c := range cols {
				if c.Max == 0.4 {
					hits++
					if at < c.Start || at >= c.End {
						t.Errorf("spike at %d reported by column [%d, %d)", at, c.Start, c.End)
					}
				} else if c.Max > -29.5 {
					t.Errorf("column [%d, %d) max %v, want at most -29.5", c.Start, c.End, c.Max)
				}
			}
			if hits != 1 {
				t.Errorf("spike at element %d of %d in %d columns: found in %d columns, want 1", at, threeHours, columns, hits)
			}
		}
	}
}

// TestDecimateNonFinite: NaN (window not full) and -Inf (silence) are
// skipped; a column of nothing else is a gap (not Valid), never a zero.
func TestDecimateNonFinite(t *testing.T) {
	nan, inf := float32(math.NaN()), float32(math.Inf(-1))
	series := []float32{nan, nan, -20, nan, inf, inf, -24, inf, inf, inf, nan, -30}
	cols := Decimate(series, 6) // two elements per column
	want := []struct {
		valid    bool
		min, max float32
	}{
		{false, 0, 0},
		{true, -20, -20},
		{false, 0, 0},
		{true, -24, -24},
		{false, 0, 0},
		{true, -30, -30},
	}
	for i, w := range want {
		c := cols[i]
		if c.Valid != w.valid || (w.valid && (c.Min != w.min || c.Max != w.max)) {
			t.Errorf("column %d = %+v, want valid=%v min=%v max=%v", i, c, w.valid, w.min, w.max)
		}
	}
	// Column [2, 4) holds the windows ending at 0.3 and 0.4 s: drawn at 0.35 s.
	if path := seriesPath(cols, seriesStepS, scale{0, 1.2, 0, 120}, scale{-60, 0, 300, 0}); path != "M35 100 h0.5 M75 120 h0.5 M115 150 h0.5" {
		t.Errorf("path through gaps = %q, want three separate dots", path)
	}
}

// TestDecimateCoversEveryElement cross-checks Decimate against a plain
// scan at awkward lengths: every element lies in exactly one column, and
// each column's extremes equal the brute-force ones.
func TestDecimateCoversEveryElement(t *testing.T) {
	const columns = 50
	for _, n := range []int{0, 1, columns - 1, columns, columns + 1, 2*columns - 1, 2 * columns, 7919} {
		series := make([]float32, n)
		for i := range series {
			series[i] = float32(math.Sin(float64(i)*1.7)) * 40
		}
		cols := Decimate(series, columns)
		if want := min(n, columns); len(cols) != want {
			t.Fatalf("n=%d: %d columns, want %d", n, len(cols), want)
		}
		next := 0
		for _, c := range cols {
			if c.Start != next || c.End <= c.Start {
				t.Fatalf("n=%d: column [%d, %d) does not follow %d", n, c.Start, c.End, next)
			}
			lo, hi := series[c.Start], series[c.Start]
			loAt, hiAt := c.Start, c.Start
			for i := c.Start; i < c.End; i++ {
				if series[i] < lo {
					lo, loAt = series[i], i
				}
				if series[i] > hi {
					hi, hiAt = series[i], i
				}
			}
			if !c.Valid || c.Min != lo || c.Max != hi || c.MinFirst != (loAt <= hiAt) {
				t.Errorf("n=%d: column [%d, %d) = %+v, want min %v max %v minFirst %v", n, c.Start, c.End, c, lo, hi, loAt <= hiAt)
			}
			next = c.End
		}
		if next != n {
			t.Errorf("n=%d: columns end at %d", n, next)
		}
	}
}

func TestDecimatePanicsWithoutColumns(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("Decimate(series, 0) did not panic")
		}
	}()
	Decimate([]float32{1}, 0)
}
