package rules

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// hundredths rounds x to the nearest 0.01 and returns it as a whole number of
// hundredths. Every limit comparison in this package works on these integers,
// so that -22.8 computed as -23 + 0.2 and -22.8 parsed from a file compare
// equal (see the package comment). The rounding is that of printing x with
// two decimals (strconv, correctly rounded from x's exact binary value), so
// a figure printed with two decimals is always the one that was judged.
func hundredths(x float64) int64 {
	if math.IsNaN(x) || math.IsInf(x, 0) || math.Abs(x) > 1e15 {
		return int64(math.Round(x * 100))
	}
	var q int64
	neg := false
	for _, c := range strconv.FormatFloat(x, 'f', 2, 64) {
		switch {
		case c == '-':
			neg = true
		case c >= '0' && c <= '9':
			q = q*10 + int64(c-'0')
		}
	}
	if neg {
		q = -q
	}
	return q
}

// above reports whether value lies above limit after rounding both to 0.01.
func above(value, limit float64) bool { return hundredths(value) > hundredths(limit) }

// below reports whether value lies below limit after rounding both to 0.01.
func below(value, limit float64) bool { return hundredths(value) < hundredths(limit) }

// round1 rounds x to one decimal.
func round1(x float64) float64 { return math.Round(x*10) / 10 }

// round2 rounds x to two decimals, as hundredths does.
func round2(x float64) float64 { return float64(hundredths(x)) / 100 }

// num writes x with the given number of decimals and an ASCII minus; it
// never writes "-0.0".
func num(x float64, decimals int) string {
	s := fmt.Sprintf("%.*f", decimals, x)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// signed writes x like num but with a "+" before positive values (gains,
// true peaks above full scale).
func signed(x float64, decimals int) string {
	s := num(x, decimals)
	if !strings.HasPrefix(s, "-") && strings.Trim(s, "0.") != "" {
		s = "+" + s
	}
	return s
}

// decimalsFor returns 2 when value lies within 0.1 of edge and has a
// hundredths digit, so that one decimal could print it as the edge itself
// or misstate how far it is from it; 1 otherwise.
func decimalsFor(value, edge float64) int {
	q, e := hundredths(value), hundredths(edge)
	if d := q - e; d > -10 && d < 10 && q%10 != 0 {
		return 2
	}
	return 1
}

// near writes value with the decimals decimalsFor chooses against edge.
func near(value, edge float64) string { return num(value, decimalsFor(value, edge)) }

// nearSigned is near with a "+" before positive values.
func nearSigned(value, edge float64) string { return signed(value, decimalsFor(value, edge)) }

// exact writes x at the 0.01 resolution kweigh judges at: one decimal when
// its hundredths digit is zero, two otherwise.
func exact(x float64) string {
	if hundredths(x)%10 != 0 {
		return num(x, 2)
	}
	return num(x, 1)
}

// shown returns v as a reason prints it beside edge, with the decimals
// decimalsFor chooses and rounded from v itself, exactly as the reports'
// figures print it: the text, and the number the text means, so that
// arithmetic on it agrees with what a person reads.
func shown(v, edge float64) (float64, string) {
	text := num(v, decimalsFor(v, edge))
	x, err := strconv.ParseFloat(text, 64)
	if err != nil { // num always writes a plain decimal
		return round2(v), text
	}
	return x, text
}

// amount writes a non-negative difference with one decimal, or two when it
// is below 0.1 and has a hundredths digit.
func amount(d float64) string { return num(d, decimalsFor(d, 0)) }
