package notation

import (
	"math"
	"strconv"
	"strings"
)

// fixedDecimals is the most decimals an uncertainty is written with in
// fixed notation; a smaller one is written as 3.4e-12, whose last digit
// still sits at the value's last decimal.
const fixedDecimals = 9

// floatDigits is the number of significant digits a float64 holds with
// certainty; no value is written with more.
const floatDigits = 15

// PlusMinus writes v ± u with u rounded to two significant digits and v
// rounded to the same decimal place: "0.3183073 ± 0.0000034",
// "13.40940 ± 0.00086", "1230 ± 120".
//
// An uncertainty below what a float64 resolves at v (about 1e-15 of |v|)
// leaves v written in full, with its 15 significant digits and no
// trailing zeros: "0.3183 ± 1.7e-17". An uncertainty that is not a
// finite number ≥ 0 is written as it is, after v in full.
func PlusMinus(v, u float64) string {
	vs, us := Rounded(v, u)
	return vs + " ± " + us
}

// Rounded returns v and u as PlusMinus writes them, apart, for a table
// with a column each.
func Rounded(v, u float64) (value, uncertainty string) {
	if math.IsNaN(v) || math.IsInf(v, 0) || math.IsNaN(u) || math.IsInf(u, 0) || u < 0 {
		return strconv.FormatFloat(v, 'g', floatDigits, 64), strconv.FormatFloat(u, 'g', -1, 64)
	}
	// The decimal place of u's second significant digit: u ≈ d1d2 × 10^-dec.
	dec := decimalsFor(u)
	if u == 0 || float64(dec) > floatDigits-1-math.Floor(math.Log10(math.Max(math.Abs(v), 1e-300))) {
		// Below the resolution of v: v in full.
		us := "0"
		if u > 0 {
			us = strconv.FormatFloat(u, 'e', 1, 64)
		}
		return strconv.FormatFloat(v, 'g', floatDigits, 64), us
	}
	if dec <= 0 {
		p := math.Pow(10, float64(-dec))
		return strconv.FormatFloat(math.Round(v/p)*p, 'f', 0, 64), strconv.FormatFloat(math.Round(u/p)*p, 'f', 0, 64)
	}
	value = strconv.FormatFloat(v, 'f', dec, 64)
	if strings.Trim(value, "-0.") == "" {
		value = strings.TrimPrefix(value, "-") // no "-0.00"
	}
	if dec <= fixedDecimals {
		uncertainty = strconv.FormatFloat(u, 'f', dec, 64)
	} else {
		uncertainty = strconv.FormatFloat(u, 'e', 1, 64)
	}
	return value, uncertainty
}

// decimalsFor returns the number of decimals at which u > 0 has two
// significant digits once rounded there (negative for u ≥ 100): 2 for
// 0.34, 7 for 3.4e-6, 6 for 9.96e-6 (which rounds to 1.0e-5).
func decimalsFor(u float64) int {
	if u == 0 {
		return 0
	}
	dec := 1 - int(math.Floor(math.Log10(u)))
	// Rounding to two digits can carry into a third (9.96 → 10.0):
	// the second digit then sits one place further left.
	if r := math.Round(u * math.Pow(10, float64(dec))); r >= 100 {
		dec--
	}
	return dec
}

// Tuple writes integers as "(a, b, c)": Betti numbers, the coefficients
// of a gap label.
func Tuple(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return "(" + strings.Join(s, ", ") + ")"
}

// Unit writes a unit after a number: " mm", or "" for no unit.
func Unit(unit string) string {
	if unit == "" {
		return ""
	}
	return " " + unit
}
