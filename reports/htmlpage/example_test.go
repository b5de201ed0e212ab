package htmlpage_test

import (
	"fmt"
	"math"
	"strings"

	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/reports/htmlpage"
)

// A three-hour programme gets a tick every 30 minutes, a 95-second one
// every 15 seconds.
func ExampleTimeTicks() {
	for _, duration := range []float64{3 * 3600, 95} {
		var labels []string
		for _, t := range htmlpage.TimeTicks(duration, 8) {
			labels = append(labels, reports.Clock(t))
		}
		fmt.Println(strings.Join(labels, " "))
	}
	// Output:
	// 0:00:00 0:30:00 1:00:00 1:30:00 2:00:00 2:30:00 3:00:00
	// 0:00:00 0:00:15 0:00:30 0:00:45 0:01:00 0:01:15 0:01:30
}

// Decimation keeps each column's extremes, so a single loud element
// survives; a column of only NaN (window not full) or -Inf (silence) is a
// gap.
func ExampleDecimate() {
	nan, silence := float32(math.NaN()), float32(math.Inf(-1))
	series := []float32{nan, nan, -23, -22, -24, -3, silence, silence}
	for _, c := range htmlpage.Decimate(series, 4) {
		if !c.Valid {
			fmt.Printf("[%d,%d) gap\n", c.Start, c.End)
			continue
		}
		fmt.Printf("[%d,%d) %v..%v\n", c.Start, c.End, c.Min, c.Max)
	}
	// Output:
	// [0,2) gap
	// [2,4) -23..-22
	// [4,6) -24..-3
	// [6,8) gap
}
