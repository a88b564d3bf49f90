package ripstest

import (
	"fmt"
	"os"
	"strconv"
	"strings"
)

// WriteCloud writes a cloud as text, one point a line with its coordinates
// separated by spaces, each printed exactly (shortest decimal that reads
// back to the same float64; grid coordinates are dyadic, hence finite
// decimals) — the point-cloud format both engines read.
func WriteCloud(path string, pts [][]float64) error {
	var b strings.Builder
	for _, p := range pts {
		for k, x := range p {
			if k > 0 {
				b.WriteByte(' ')
			}
			b.WriteString(strconv.FormatFloat(x, 'f', -1, 64))
		}
		b.WriteByte('\n')
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		return fmt.Errorf("writing the cloud: %w", err)
	}
	return nil
}
