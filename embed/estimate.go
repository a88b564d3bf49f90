package embed

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/spatial/kdtree"
)

// ErrDuplicatePoints is wrapped by IntrinsicDimension's error when a point
// has another at distance zero.
var ErrDuplicatePoints = errors.New("two points coincide")

// Entropy returns the Kozachenko–Leonenko estimate, in nats, of the
// differential entropy of the distribution the points are drawn from
// (Kozachenko & Leonenko, Probl. Inf. Transm. 23, 95, 1987), in the k-th
// nearest neighbour form of Kraskov, Stögbauer & Grassberger (Phys. Rev. E
// 69, 066138, 2004, eq. 20):
//
//	Ĥ = ψ(N) − ψ(k) + log c_d + (d/N) Σ_i log ε_i,
//
// with ψ the digamma function, d the dimension, ε_i twice the distance
// from point i to its k-th nearest other point, and c_d the volume of the
// ball of diameter 1. Distances are in the maximum norm, so the balls are
// cubes and c_d = 1 (the same norm as MutualInformation).
//
// The estimate is consistent for any k ≥ 1; small k (3 to 10) keeps the
// bias from density variations low. Points at distance zero from their
// k-th neighbour — a distribution with atoms, like the delay vectors of a
// periodic chain — give −∞, the differential entropy of a discrete
// distribution. Entropy returns an error for fewer than k+1 points, k < 1,
// points of different dimensions or coordinates that are not finite.
func Entropy(points [][]float64, k int) (float64, error) {
	d, err := checkPoints(points, k, "entropy")
	if err != nil {
		return 0, err
	}
	n := len(points)
	tree := kdtree.New(newChebPoints(points), false)
	var sum float64
	for i, p := range points {
		r := kthDistance(tree, chebPoint{x: p, id: i}, k)
		if r == 0 {
			return math.Inf(-1), nil
		}
		sum += math.Log(2 * r)
	}
	return mathext.Digamma(float64(n)) - mathext.Digamma(float64(k)) + float64(d)*sum/float64(n), nil
}

// MutualInformation returns the estimate, in nats, of the mutual
// information I(X; Y) between paired samples x[i], y[i] by algorithm 1 of
// Kraskov, Stögbauer & Grassberger (Phys. Rev. E 69, 066138, 2004):
//
//	Î = ψ(k) + ψ(N) − ⟨ψ(n_x + 1) + ψ(n_y + 1)⟩,
//
// where for each i, ε_i/2 is the distance from (x_i, y_i) to its k-th
// nearest other point in the joint space under the maximum norm
// ‖(x, y)‖ = max(‖x‖, ‖y‖), and n_x(i), n_y(i) count the other points
// strictly within ε_i/2 of x_i in X and of y_i in Y (maximum norm there
// too).
//
// The estimate is nearly unbiased for independent variables and, for
// Gaussians, within a few hundredths of a nat of −½ log(1 − ρ²) at N of a
// few thousand (Kraskov et al. 2004). Exact ties between points (discrete
// data) bias it; it is meant for continuous samples. MutualInformation
// returns an error when x and y differ in length, and for the reasons
// Entropy does.
func MutualInformation(x, y [][]float64, k int) (float64, error) {
	if len(x) != len(y) {
		return 0, fmt.Errorf("mutual information: %d x samples and %d y samples", len(x), len(y))
	}
	if _, err := checkPoints(x, k, "mutual information (x)"); err != nil {
		return 0, err
	}
	if _, err := checkPoints(y, k, "mutual information (y)"); err != nil {
		return 0, err
	}
	n := len(x)
	joint := make([][]float64, n)
	for i := range x {
		joint[i] = append(append(make([]float64, 0, len(x[i])+len(y[i])), x[i]...), y[i]...)
	}
	jt := kdtree.New(newChebPoints(joint), false)
	xt := kdtree.New(newChebPoints(x), false)
	yt := kdtree.New(newChebPoints(y), false)
	var sum float64
	for i := range joint {
		// The maximum norm in the joint space is the larger of the
		// maximum norms in X and Y, so a joint cube of half-side ε/2 is
		// the product of the marginal cubes.
		eps := kthDistance(jt, chebPoint{x: joint[i], id: i}, k)
		nx := countWithin(xt, chebPoint{x: x[i], id: i}, eps)
		ny := countWithin(yt, chebPoint{x: y[i], id: i}, eps)
		sum += mathext.Digamma(float64(nx+1)) + mathext.Digamma(float64(ny+1))
	}
	return mathext.Digamma(float64(k)) + mathext.Digamma(float64(n)) - sum/float64(n), nil
}

// IntrinsicDimension returns the maximum-likelihood estimate of the
// intrinsic dimension of the manifold the points sample (Levina & Bickel,
// "Maximum likelihood estimation of intrinsic dimension", NIPS 2004),
// averaged over neighbourhood sizes k = k1, …, k2.
//
// For each point x and each k, with T_j(x) the Euclidean distance to the
// j-th nearest other point, the local estimate of the inverse dimension is
//
//	1/m̂_k(x) = (1/(k−1)) Σ_{j<k} log(T_k(x)/T_j(x)).
//
// For a Poisson process of dimension m, m·log(T_k/T_j), j < k, are k−1
// independent unit exponentials, so this is unbiased for 1/m. The inverses
// are averaged over the points before inverting (the correction of MacKay
// & Ghahramani, 2005, to averaging the m̂_k(x) themselves, which is biased
// upwards), m̂_k = 1/⟨1/m̂_k(x)⟩, and the m̂_k are averaged over k.
//
// Boundaries and curvature bias the estimate down a little at moderate N
// (a cube's corners and faces hold fewer neighbours). IntrinsicDimension
// returns an error unless 2 ≤ k1 ≤ k2 < len(points), for points of
// different dimensions or with coordinates that are not finite, and one
// wrapping ErrDuplicatePoints when a point's nearest other point is at
// distance zero.
func IntrinsicDimension(points [][]float64, k1, k2 int) (float64, error) {
	if k1 < 2 || k2 < k1 {
		return 0, fmt.Errorf("intrinsic dimension: neighbourhood sizes k1 = %d, k2 = %d: need 2 ≤ k1 ≤ k2", k1, k2)
	}
	if _, err := checkPoints(points, k2, "intrinsic dimension"); err != nil {
		return 0, err
	}
	n := len(points)
	eu := make(delayPoints, n)
	for i, p := range points {
		eu[i] = delayPoint{x: p, id: i}
	}
	tree := kdtree.New(eu, false)
	inv := make([]float64, k2+1) // Σ over points of 1/m̂_k(x)
	for i, p := range points {
		keep := &othersKeeper{NKeeper: kdtree.NewNKeeper(k2), self: i}
		tree.NearestSet(keep, delayPoint{x: p, id: i})
		t := sortedDistances(keep.Heap)
		if len(t) < k2 {
			return 0, fmt.Errorf("intrinsic dimension: point %d has only %d neighbours", i, len(t))
		}
		if t[0] == 0 {
			return 0, fmt.Errorf("intrinsic dimension: point %d: %w", i, ErrDuplicatePoints)
		}
		// cum = Σ_{j<k} log T_j, so Σ_{j<k} log(T_k/T_j) = (k−1) log T_k − cum.
		var cum float64
		for k := 2; k <= k2; k++ {
			cum += math.Log(t[k-2])
			if k >= k1 {
				inv[k] += (float64(k-1)*math.Log(t[k-1]) - cum) / float64(k-1)
			}
		}
	}
	var m float64
	for k := k1; k <= k2; k++ {
		m += float64(n) / inv[k]
	}
	return m / float64(k2-k1+1), nil
}

// checkPoints checks a sample for the estimators: at least k+1 points of
// one dimension, finite coordinates, k ≥ 1. It returns the dimension.
func checkPoints(points [][]float64, k int, what string) (int, error) {
	if k < 1 {
		return 0, fmt.Errorf("%s: k = %d: need at least one neighbour", what, k)
	}
	if len(points) < k+1 {
		return 0, fmt.Errorf("%s: %d points are too few for k = %d neighbours", what, len(points), k)
	}
	d := len(points[0])
	if d == 0 {
		return 0, fmt.Errorf("%s: points have no coordinates", what)
	}
	for i, p := range points {
		if len(p) != d {
			return 0, fmt.Errorf("%s: point %d has %d coordinates, point 0 has %d", what, i, len(p), d)
		}
		for _, v := range p {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, fmt.Errorf("%s: point %d has the coordinate %v", what, i, v)
			}
		}
	}
	return d, nil
}

// kthDistance returns the distance, in the tree's norm, from q to its k-th
// nearest point other than itself.
func kthDistance(tree *kdtree.Tree, q chebPoint, k int) float64 {
	keep := &othersKeeper{NKeeper: kdtree.NewNKeeper(k), self: q.id}
	tree.NearestSet(keep, q)
	t := sortedDistances(keep.Heap)
	return t[len(t)-1]
}

// sortedDistances returns the distances held by a keeper's heap (squared
// norms), ascending, skipping the sentinel.
func sortedDistances(h kdtree.Heap) []float64 {
	var t []float64
	for _, c := range h {
		if c.Comparable != nil {
			t = append(t, math.Sqrt(c.Dist))
		}
	}
	// NearestSet leaves the heap sorted ascending; keep the guarantee
	// local with an insertion pass (k is small).
	for i := 1; i < len(t); i++ {
		for j := i; j > 0 && t[j] < t[j-1]; j-- {
			t[j], t[j-1] = t[j-1], t[j]
		}
	}
	return t
}

// countWithin returns the number of points other than q strictly within
// distance r of it.
func countWithin(tree *kdtree.Tree, q chebPoint, r float64) int {
	c := &counter{Heap: kdtree.Heap{{Dist: r * r}}, self: q.id}
	tree.NearestSet(c, q)
	return c.n
}

// othersKeeper keeps the k nearest points other than the query itself.
// Ties at the k-th distance may be kept in any order, but the k-th
// distance, all the estimators use, does not depend on it.
type othersKeeper struct {
	*kdtree.NKeeper
	self int
}

// Keep implements kdtree.Keeper.
func (k *othersKeeper) Keep(c kdtree.ComparableDist) {
	if pointID(c.Comparable) == k.self {
		return
	}
	k.NKeeper.Keep(c)
}

// counter is a kdtree.Keeper that keeps nothing and counts the points
// other than the query at squared distance below its sentinel's.
type counter struct {
	kdtree.Heap
	self, n int
}

// Keep implements kdtree.Keeper.
func (c *counter) Keep(p kdtree.ComparableDist) {
	if p.Dist < c.Heap[0].Dist && pointID(p.Comparable) != c.self {
		c.n++
	}
}

func pointID(c kdtree.Comparable) int {
	switch p := c.(type) {
	case chebPoint:
		return p.id
	case delayPoint:
		return p.id
	}
	return -1
}

// chebPoint is a point of a k-d tree under the maximum (Chebyshev) norm.
type chebPoint struct {
	x  []float64
	id int
}

// Compare implements kdtree.Comparable.
func (p chebPoint) Compare(c kdtree.Comparable, d kdtree.Dim) float64 {
	return p.x[d] - c.(chebPoint).x[d]
}

// Dims implements kdtree.Comparable.
func (p chebPoint) Dims() int { return len(p.x) }

func (p chebPoint) coords() []float64 { return p.x }

// Distance implements kdtree.Comparable: the squared maximum norm, which
// is at least the squared distance to any splitting plane, as the tree's
// pruning needs.
func (p chebPoint) Distance(c kdtree.Comparable) float64 {
	q := c.(chebPoint)
	var m float64
	for i, v := range p.x {
		m = math.Max(m, math.Abs(v-q.x[i]))
	}
	return m * m
}

// chebPoints is the k-d tree set of points under the maximum norm.
type chebPoints = treeSet[chebPoint]

func newChebPoints(points [][]float64) chebPoints {
	c := make(chebPoints, len(points))
	for i, p := range points {
		c[i] = chebPoint{x: p, id: i}
	}
	return c
}
