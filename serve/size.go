package serve

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// sizeUnits are the multipliers ParseSize accepts: SI prefixes (powers of
// 1000) and binary prefixes (powers of 1024), as IEC 80000-13 names them.
var sizeUnits = map[string]float64{
	"":    1,
	"b":   1,
	"kb":  1e3,
	"mb":  1e6,
	"gb":  1e9,
	"tb":  1e12,
	"kib": 1 << 10,
	"mib": 1 << 20,
	"gib": 1 << 30,
	"tib": 1 << 40,
}

// ParseSize reads a byte count written as a number with an optional unit:
// "1048576", "500MB" (SI, 500 000 000 bytes), "50MiB" (binary, 50 × 2²⁰),
// "8GiB", "1.5GB". Units are case-insensitive ("500mb" is 500 MB: a
// gate's upload limit is never in bits). The result must be at least one
// byte and fit an int64.
func ParseSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	i := 0
	for i < len(t) && (t[i] >= '0' && t[i] <= '9' || t[i] == '.') {
		i++
	}
	num, unit := t[:i], strings.ToLower(strings.TrimSpace(t[i:]))
	if num == "" {
		return 0, fmt.Errorf("size %q: want a number of bytes, optionally with a unit (e.g. 500MB, 50MiB, 8GiB)", s)
	}
	mult, ok := sizeUnits[unit]
	if !ok {
		return 0, fmt.Errorf("size %q: unknown unit %q (use B, kB, MB, GB, TB, KiB, MiB, GiB or TiB)", s, t[i:])
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil {
		return 0, fmt.Errorf("size %q: %q is not a number", s, num)
	}
	bytes := math.Round(v * mult)
	switch {
	case bytes < 1:
		return 0, fmt.Errorf("size %q: must be at least one byte", s)
	case bytes >= math.MaxInt64:
		return 0, fmt.Errorf("size %q: too large", s)
	}
	return int64(bytes), nil
}
