package ripstest

import (
	"bufio"
	"bytes"
	"fmt"
	"os/exec"
	"slices"
	"strconv"
	"strings"

	"phasonhull/topology/rips"
)

// ReferenceProgram names the reference binary for coefficients in Z/prime:
// ripser for 2 (or 0, the engine's default), ripser-coeff otherwise.
func ReferenceProgram(prime int) string {
	if prime == 0 || prime == 2 {
		return "ripser"
	}
	return "ripser-coeff"
}

// ReferenceArgs returns the reference program's arguments for the cloud in
// the file at path (written by WriteCloud), computed to homology dimension
// dim with coefficients in Z/prime (0: 2) up to threshold (0: the enclosing
// radius).
func ReferenceArgs(path string, dim, prime int, threshold float64) []string {
	args := []string{"--format", "point-cloud", "--dim", strconv.Itoa(dim)}
	if prime != 0 && prime != 2 {
		args = append(args, "--modulus", strconv.Itoa(prime))
	}
	if threshold > 0 {
		args = append(args, "--threshold", strconv.FormatFloat(threshold, 'g', -1, 64))
	}
	return append(args, path)
}

// RunReference runs the reference binary bin on the cloud in the file at
// path (see ReferenceArgs) and returns its bars, sorted.
func RunReference(bin, path string, dim, prime int, threshold float64) ([]string, error) {
	args := ReferenceArgs(path, dim, prime, threshold)
	out, err := exec.Command(bin, args...).Output()
	if err != nil {
		return nil, fmt.Errorf("%s %s: %w", bin, strings.Join(args, " "), err)
	}
	return ParseReference(out)
}

// ParseReference reads the bars the reference prints: a line
// "persistence intervals in dim k:" opens dimension k, and each bar is a
// line " [birth,death)" or " [birth, )". It returns them sorted.
func ParseReference(out []byte) ([]string, error) {
	var bars []string
	dim := -1
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if rest, ok := strings.CutPrefix(line, "persistence intervals in dim "); ok {
			d, err := strconv.Atoi(strings.TrimSuffix(rest, ":"))
			if err != nil {
				return nil, fmt.Errorf("reference output: %q: %w", line, err)
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

// FormatBars writes bars in the reference's notation, sorted.
func FormatBars(bars []rips.Bar) []string {
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
