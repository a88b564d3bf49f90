package topology

import (
	"cmp"
	"math"
	"slices"

	"phasonhull/topology/notation"
)

// labelTol is the distance below which two integrated densities of states
// count as equal (they differ only by rounding), and within which an IDS
// counts as 0 or 1.
const labelTol = 1e-12

// Label is one value the integrated density of states (IDS) may take in a
// spectral gap, with the integer coefficients that write it in the
// gap-label group.
//
// By the gap-labelling theorem (Bellissard, "Gap labelling theorems for
// Schrödinger operators", in From Number Theory to Physics, Springer 1992)
// the IDS in any gap of an operator on a chain with hull Ω lies in the
// countable group of values of the trace on K0 of the crossed product; for
// a circle hull rotated by θ that group is Z + Zθ (Pimsner & Voiculescu,
// J. Operator Theory 4, 1980), for a two-torus Z + Zθ1 + Zθ2.
//
// Label is the one gap-label type of the module: the hull analysis lists
// its labels with it and a spectrum's gaps carry it; its JSON form is
// {"ids": …, "coeffs": […]}.
type Label struct {
	// IDS is the integrated density of states, strictly inside (0, 1).
	IDS float64 `json:"ids"`
	// Coeffs are the integers with IDS = Coeffs[0] + Σ_i Coeffs[i+1]·θ_i:
	// [n, m] for one angle, [n, m1, m2] for two; for the labels of a
	// period p (PeriodicLabels), IDS = Coeffs[0] + Coeffs[1]/p.
	Coeffs []int `json:"coeffs"`
}

// CoeffString writes the coefficients as every text, page and figure
// writes them: "(n, m)", "(n, m1, m2)".
func (l Label) CoeffString() string { return notation.Tuple(l.Coeffs) }

// Order is the order of the label, Σ|m_i| over its angle coefficients:
// the smaller, the wider the gap it tends to label.
func (l Label) Order() int { return absSum(l.Coeffs[1:]) }

// Uncertainty is the standard uncertainty of the label's IDS, Σ|m_i|·σ_i,
// from the uncertainties sigma of the angles its coefficients multiply.
// It is 0 when sigma does not give one per angle.
func (l Label) Uncertainty(sigma []float64) float64 {
	if len(sigma) != len(l.Coeffs)-1 {
		return 0
	}
	var u float64
	for i, m := range l.Coeffs[1:] {
		u += float64(abs(m)) * sigma[i]
	}
	return u
}

// Listed is a label as a report lists it: with the uncertainty of its
// IDS, and whether that uncertainty blurs it with its nearest neighbour.
type Listed struct {
	Label
	// Uncertainty is Label.Uncertainty of the angles' uncertainties.
	Uncertainty float64
	// Blurred is set when Uncertainty is more than half the distance
	// to the nearest other label: a gap at this IDS could as well carry
	// that label.
	Blurred bool
}

// List returns labels as a report lists them: lowest order first, then by
// IDS, each with its uncertainty from the angles' uncertainties sigma (nil
// when they are exact or unknown) and whether it is Blurred with its
// nearest neighbour among labels.
func List(labels []Label, sigma []float64) []Listed {
	byIDS := slices.Clone(labels)
	slices.SortFunc(byIDS, func(x, y Label) int { return cmp.Compare(x.IDS, y.IDS) })
	out := make([]Listed, len(labels))
	for i, l := range labels {
		u := l.Uncertainty(sigma)
		gap := math.Inf(1)
		j, _ := slices.BinarySearchFunc(byIDS, l.IDS, func(x Label, ids float64) int { return cmp.Compare(x.IDS, ids) })
		for _, k := range []int{j - 1, j + 1} {
			if k >= 0 && k < len(byIDS) {
				gap = min(gap, math.Abs(byIDS[k].IDS-l.IDS))
			}
		}
		out[i] = Listed{Label: l, Uncertainty: u, Blurred: u > gap/2}
	}
	slices.SortStableFunc(out, func(x, y Listed) int {
		return cmp.Or(cmp.Compare(x.Order(), y.Order()), cmp.Compare(x.IDS, y.IDS))
	})
	return out
}

// Labels lists the gap labels n + m1·θ1 (+ m2·θ2 ...) that fall strictly
// inside (0, 1), for angle coefficients |m_i| ≤ maxCoeff not all zero,
// sorted by IDS. angles are the generators θ_i in turns (one for a circle
// hull, two for a torus); they must be finite.
//
// Each coefficient vector m gives at most one label, with n = −⌊m·θ⌋; when
// the angles and 1 are rationally independent no two vectors give the same
// IDS and there are exactly (2·maxCoeff + 1)^d − 1 labels. For rational
// angles several vectors can give the same IDS, and m·θ can be an integer
// (IDS 0 or 1, dropped); values that agree to within rounding (1e-12) are
// merged into one label, kept with the smallest representation: least
// Σ|m_i|, then least |n|, then the lexicographically first Coeffs.
//
// Labels returns nil when maxCoeff < 1 or there are no angles.
func Labels(angles []float64, maxCoeff int) []Label {
	for _, a := range angles {
		if math.IsNaN(a) || math.IsInf(a, 0) {
			panic("topology: Labels: non-finite angle")
		}
	}
	d := len(angles)
	if maxCoeff < 1 || d == 0 {
		return nil
	}
	var all []Label
	forEachCoeff(d, maxCoeff, func(m []int) {
		if !slices.ContainsFunc(m, func(v int) bool { return v != 0 }) {
			return
		}
		s := dotInt(m, angles)
		fl := math.Floor(s)
		ids := s - fl
		if ids <= labelTol || ids >= 1-labelTol {
			return // m·θ is an integer: the label would be 0 or 1
		}
		c := make([]int, d+1)
		c[0] = -int(fl)
		copy(c[1:], m)
		all = append(all, Label{IDS: ids, Coeffs: c})
	})
	slices.SortFunc(all, func(x, y Label) int {
		return cmp.Compare(x.IDS, y.IDS)
	})
	// Merge runs of values equal to within rounding.
	var out []Label
	for i := 0; i < len(all); {
		best, j := all[i], i+1
		for ; j < len(all) && all[j].IDS-all[i].IDS <= labelTol; j++ {
			if smallerLabel(all[j].Coeffs, best.Coeffs) {
				best = all[j]
			}
		}
		out = append(out, best)
		i = j
	}
	return out
}

// smallerLabel reports whether coefficient vector a is a smaller
// representation than b: least Σ|m_i|, then least |n|, then lexicographic.
func smallerLabel(a, b []int) bool {
	if na, nb := absSum(a[1:]), absSum(b[1:]); na != nb {
		return na < nb
	}
	if na, nb := abs(a[0]), abs(b[0]); na != nb {
		return na < nb
	}
	return slices.Compare(a, b) < 0
}

func absSum(m []int) int {
	s := 0
	for _, v := range m {
		s += abs(v)
	}
	return s
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}

// PeriodicLabels lists the gap labels of a periodic chain with p sites per
// cell: IDS = k/p for k = 1, ..., p−1, in increasing order.
//
// The labels are written in the group Z + Z·(1/p), with the single angle
// θ = 1/p, in the representation Labels uses: Coeffs = [0, k] for
// k ≤ p/2 and [1, k−p] above, so that IDS = Coeffs[0] + Coeffs[1]/p. The
// result has the same values and coefficients as Labels([]float64{1/p},
// p−1), with each IDS the correctly rounded k/p. PeriodicLabels returns nil
// for p < 2.
func PeriodicLabels(p int) []Label {
	if p < 2 {
		return nil
	}
	out := make([]Label, p-1)
	for k := 1; k < p; k++ {
		c := []int{0, k}
		if 2*k > p {
			c = []int{1, k - p}
		}
		out[k-1] = Label{IDS: float64(k) / float64(p), Coeffs: c}
	}
	return out
}

// MatchLabel returns the label nearest to a measured integrated density of
// states ids, if it lies within tol. It refuses (ok false) both when no
// label lies within tol and when the match is ambiguous: when another label
// also lies within tol of ids, or within tol of the nearest label, so that
// a measurement with uncertainty tol cannot tell the two apart. labels need
// not be sorted.
func MatchLabel(ids float64, labels []Label, tol float64) (Label, bool) {
	if math.IsNaN(ids) || !(tol >= 0) || len(labels) == 0 {
		return Label{}, false
	}
	best := -1
	for i, l := range labels {
		if best < 0 || math.Abs(l.IDS-ids) < math.Abs(labels[best].IDS-ids) {
			best = i
		}
	}
	near := labels[best]
	if math.Abs(near.IDS-ids) > tol {
		return Label{}, false
	}
	for i, l := range labels {
		if i != best && (math.Abs(l.IDS-ids) <= tol || math.Abs(l.IDS-near.IDS) <= tol) {
			return Label{}, false
		}
	}
	return near, true
}
