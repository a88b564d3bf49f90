package flagval

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ParseBytes reads a memory size such as 512MiB, 8GiB, 2GB or 1000000
// (bytes).
func ParseBytes(s string) (int64, error) {
	t := strings.TrimSpace(s)
	units := []struct {
		suffix string
		factor float64
	}{
		{"KiB", 1 << 10}, {"MiB", 1 << 20}, {"GiB", 1 << 30}, {"TiB", 1 << 40},
		{"KB", 1e3}, {"MB", 1e6}, {"GB", 1e9}, {"TB", 1e12},
		{"K", 1 << 10}, {"M", 1 << 20}, {"G", 1 << 30}, {"B", 1},
	}
	factor := 1.0
	for _, u := range units {
		if strings.HasSuffix(strings.ToUpper(t), strings.ToUpper(u.suffix)) {
			t, factor = strings.TrimSpace(t[:len(t)-len(u.suffix)]), u.factor
			break
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || v <= 0 || math.IsInf(v*factor, 0) || v*factor > math.MaxInt64/2 {
		return 0, fmt.Errorf("%q is not a memory size (examples: 512MiB, 8GiB)", s)
	}
	return int64(v * factor), nil
}
