// Package reference reads the barcodes printed by the reference program of
// the persistence engine's checks (Debian's ripser package, version 1.2.1)
// and writes the engine's bars the same way, so that the two can be
// compared as text.
//
// The reference computes in single precision and prints lengths with six
// significant digits. Bars are written as "dim:birth,death", death empty
// for a class that never dies.
package reference

import (
	"bufio"
	"bytes"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"phasonhull/topology/rips"
)

// Parse reads the bars the reference prints: a line
// "persistence intervals in dim k:" opens dimension k, and each bar is a
// line " [birth,death)" or " [birth, )". It returns them sorted.
func Parse(out []byte) ([]string, error) {
	var bars []string
	dim := -1
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if rest, ok := strings.CutPrefix(line, "persistence intervals in dim "); ok {
			d, err := strconv.Atoi(strings.TrimSuffix(rest, ":"))
			if err != nil {
				return nil, fmt.Errorf("reference output: %q: %v", line, err)
			}
			dim = d
			continue
		}
		if !strings.HasPrefix(line, "[") {
			continue
		}
		if dim < 0 || !strings.HasSuffix(line, ")") {
			return nil, fmt.Errorf("reference output: unexpected line %q", line)
		}
		birth, death, ok := strings.Cut(line[1:len(line)-1], ",")
		if !ok {
			return nil, fmt.Errorf("reference output: unexpected line %q", line)
		}
		bars = append(bars, fmt.Sprintf("%d:%s,%s", dim, birth, strings.TrimSpace(death)))
	}
	slices.Sort(bars)
	return bars, sc.Err()
}

// Single prints a length as the reference does: rounded to single
// precision, then to six significant digits.
func Single(x float64) string {
	return strconv.FormatFloat(float64(float32(x)), 'g', 6, 32)
}

// Format writes bars in the reference's notation, sorted.
func Format(bars []rips.Bar) []string {
	var out []string
	for _, b := range bars {
		death := ""
		if !b.Essential() {
			death = Single(b.Death)
		}
		out = append(out, fmt.Sprintf("%d:%s,%s", b.Dim, Single(b.Birth), death))
	}
	slices.Sort(out)
	return out
}

// Diff returns the bars only in a and only in b, both sorted.
func Diff(a, b []string) (onlyA, onlyB []string) {
	i, j := 0, 0
	for i < len(a) || j < len(b) {
		switch {
		case j == len(b) || (i < len(a) && a[i] < b[j]):
			onlyA = append(onlyA, a[i])
			i++
		case i == len(a) || b[j] < a[i]:
			onlyB = append(onlyB, b[j])
			j++
		default:
			i++
			j++
		}
	}
	return onlyA, onlyB
}
