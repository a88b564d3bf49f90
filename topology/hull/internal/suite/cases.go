package main

import (
	"bytes"
	"errors"
	"fmt"
	"hash/fnv"
	"io"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology"
	"phasonhull/topology/hull"
)

// Case is one generated chain and what is known of its hull.
type Case struct {
	Name  string      `json:"name"`
	Spec  design.Spec `json:"spec"`
	Class hull.Class  `json:"true_class"`
	// Period of a point or finite hull; Components the number of
	// components of a hull with angles (p circles, p tori; 0 for one).
	// Both follow from p and d through setHull.
	Period     int `json:"true_period,omitempty"`
	Components int `json:"true_components,omitempty"`
	// Angles are the true angles, folded into [0, ½] and sorted; nil when
	// the hull has none. AngleRef bounds their own error (0: exact by
	// construction) and AngleSource says where they come from.
	Angles      []float64 `json:"true_angles,omitempty"`
	AngleRef    float64   `json:"true_angle_precision,omitempty"`
	AngleSource string    `json:"true_angle_source,omitempty"`
	// Noise is the position noise in mean spacings (every design has mean
	// spacing 1, so it equals Spec.Noise).
	Noise float64 `json:"noise"`
	// Centroids: the chain goes through tilted 2-D centroids and
	// pattern.Read.
	Centroids bool `json:"centroids,omitempty"`
	// SizeSweep and NoiseSweep mark the cases of the breakdown sweeps.
	SizeSweep  bool `json:"size_sweep,omitempty"`
	NoiseSweep bool `json:"noise_sweep,omitempty"`
	// MinSites is the smallest size at which the class can be told from
	// its nearest rival at the case's noise (decidingSites in theory.go);
	// 0 when it can at every size. Below it, unresolved is a correct
	// answer, and naming a class other than the true one a confident
	// wrong answer all the same.
	MinSites int `json:"deciding_sites,omitempty"`
	// A plane case (-plane, plane.go): Spec is a two-dimensional family
	// (Spec.Sites the side of the patch) or, for a disordered set, Points
	// names it (poisson, hard-disk) and Spec.Sites is its side; Rotation
	// is the true A, rows the torus coordinates, columns the generating
	// basis steps (nil without angles); ThroughFile sends the plate
	// through pattern.WritePlane and pattern.ReadSites.
	Rotation    [][]float64 `json:"true_rotation,omitempty"`
	Points      string      `json:"points,omitempty"`
	ThroughFile bool        `json:"through_file,omitempty"`
}

// plane reports whether the case is a plane.
func (c Case) plane() bool {
	return c.Points != "" || c.Spec.Family == design.Plate || c.Spec.Family == design.Twisted
}

// size is the number of sites before perturbation: Spec.Sites for a
// chain, its square for a plane.
func (c Case) size() int {
	if c.plane() {
		return c.Spec.Sites * c.Spec.Sites
	}
	return c.Spec.Sites
}

// Undecidable reports whether the case is smaller than its deciding size.
func (c Case) Undecidable() bool { return c.Spec.Sites < c.MinSites }

// torus3 is the class of a 3-torus hull.
const torus3 hull.Class = "torus3"

// hullOf is the class of the hull p components × a d-torus, the hull of a
// chain with a continuous modulation of d independent angles decorated by
// a cell of p spacings (its Betti numbers are p·C(d, k): the Künneth
// formula; common practice): point or p points (finite) for d = 0, then
// circle, torus and 3-torus.
func hullOf(p, d int) hull.Class {
	switch {
	case d == 0 && p == 1:
		return hull.Point
	case d == 0:
		return hull.Finite
	case d == 1:
		return hull.Circle
	case d == 2:
		return hull.Torus
	}
	return torus3
}

// setHull sets the true class, period and components of a case from p and
// d (see hullOf).
func (c *Case) setHull(p, d int) {
	c.Class, c.Period, c.Components = hullOf(p, d), 0, 0
	if d == 0 {
		c.Period = p
	} else if p > 1 {
		c.Components = p
	}
}

// cellPeriodOf is the smallest p dividing len(cell) for which the cell
// repeats itself every p entries.
func cellPeriodOf(cell []float64) int {
	n := len(cell)
	for p := 1; p < n; p++ {
		if n%p == 0 && slices.Equal(cell[p:], cell[:n-p]) {
			return p
		}
	}
	return max(n, 1)
}

// --- the grid -------------------------------------------------------------

var (
	golden  = (math.Sqrt(5) - 1) / 2 // 1/φ
	sqrt2m1 = math.Sqrt2 - 1
	sqrt3m1 = math.Sqrt(3) - 1
)

// prototype builds the representative case of a class at a size and noise:
// the cases of the breakdown sweeps.
func prototype(class hull.Class, sites int, noise float64) Case {
	c := Case{Class: class, Noise: noise}
	switch class {
	case hull.Point:
		c.Spec = design.Spec{Family: "periodic", Cell: []float64{1}}
		c.setHull(cellPeriodOf(c.Spec.Cell), 0)
	case hull.Finite:
		// A cell of three spacings, mean 1.
		c.Spec = design.Spec{Family: "periodic", Cell: []float64{1 / 1.2, 1.5 / 1.2, 1.1 / 1.2}}
		c.setHull(cellPeriodOf(c.Spec.Cell), 0)
	case hull.Circle:
		c = modulated(sqrt2m1, []float64{0.1}, nil, 1, noise)
	case hull.Torus:
		c = twoAngle(sqrt2m1, 0.1, sqrt3m1, 0.1, noise)
	case cantor:
		c = sturmian(1-golden, noise)
	case disordered:
		c.Spec = design.Spec{Family: "random", Dist: "uniform", Spread: 0.5}
	}
	c.Spec.Sites, c.Spec.Noise = sites, noise
	c.Name = fmt.Sprintf("%s/N%d/%s", class, sites, noiseLabel(noise))
	return c
}

// modulated is x_n = n + Σ_k a_k sin 2πk(nθ+φ) + b_k cos 2πk(nθ+φ); its
// hull is a circle turned by gθ, g the gcd of the harmonic orders present
// (common practice), and the angle is exact by construction.
func modulated(theta float64, sin, cos []float64, g int, noise float64) Case {
	c := Case{
		Noise:       noise,
		Spec:        design.Spec{Family: "modulated", Theta: theta, Sin: sin, Cos: cos, Phase: 0.13},
		Angles:      []float64{topology.Fold(float64(g) * theta)},
		AngleSource: fmt.Sprintf("%d·θ of the construction", g),
	}
	c.setHull(1, 1)
	return c
}

// twoAngle has a two-torus hull with the module Z + Zθ1 + Zθ2 (common
// practice).
func twoAngle(t1, a1, t2, a2, noise float64) Case {
	c := Case{
		Noise:       noise,
		Spec:        design.Spec{Family: "two-angle", Theta: t1, Amp: a1, Theta2: t2, Amp2: a2, Phase: 0.13, Phase2: 0.71},
		Angles:      topology.CanonicalBasis([]float64{t1, t2}),
		AngleSource: "θ1, θ2 of the construction",
	}
	c.setHull(1, 2)
	return c
}

// decorated is a cell of spacings decorating the modulation a·sin 2π(nθ+φ):
// its hull is p circles, p the cell's smallest period (see the decorated
// family), turned by θ; the module (1/p)Z + Zθ holds θ + k/p as well, and
// the comparison of angles allows for it.
func decorated(cell []float64, theta, a, noise float64) Case {
	c := Case{
		Noise:       noise,
		Spec:        design.Spec{Family: "decorated", Cell: cell, Theta: theta, Sin: []float64{a}, Phase: 0.13},
		Angles:      []float64{topology.Fold(theta)},
		AngleSource: "θ of the construction, modulo 1/p",
	}
	d := 0
	if a != 0 {
		d = 1
	}
	c.setHull(cellPeriodOf(cell), d)
	if d == 0 {
		c.Angles, c.AngleSource = nil, ""
	}
	return c
}

// decoratedAngles is a cell of spacings decorating the modulation
// Σ_k a_k sin 2π(nθ_k+φ_k): p d-tori, p the cell's smallest period and d
// the angles with a nonzero amplitude (the orbit of (n mod p, nθ_1, …)
// is dense in Z_p × T^d; common practice); the module
// (1/p)Z + Zθ_1 + … holds θ_k + j/p as well, and the comparison of angles
// allows for it.
func decoratedAngles(cell, thetas, amps []float64, noise float64) Case {
	var angles []float64
	for k, t := range thetas {
		if amps[k] != 0 {
			angles = append(angles, t)
		}
	}
	c := Case{
		Noise:       noise,
		Spec:        design.Spec{Family: "decorated", Cell: cell, Thetas: thetas, Amps: amps, Phases: []float64{0.13, 0.71, 0.37}[:len(thetas)]},
		Angles:      topology.CanonicalBasis(angles),
		AngleSource: "θ_k of the construction, modulo 1/p",
	}
	c.setHull(cellPeriodOf(cell), len(angles))
	if len(angles) == 0 {
		c.Angles, c.AngleSource = nil, ""
	}
	return c
}

// multiAngle is x_n = n + Σ_k a_k sin 2π(nθ_k+φ_k): a d-torus for the d
// angles with a nonzero amplitude, taken independent over the rationals
// with 1 (Kronecker's theorem; common practice).
func multiAngle(thetas, amps []float64, noise float64) Case {
	var angles []float64
	for k, t := range thetas {
		if amps[k] != 0 {
			angles = append(angles, t)
		}
	}
	c := Case{
		Noise:       noise,
		Spec:        design.Spec{Family: "multi-angle", Thetas: thetas, Amps: amps, Phases: []float64{0.13, 0.71, 0.37}[:len(thetas)]},
		Angles:      topology.CanonicalBasis(angles),
		AngleSource: "θ_k of the construction",
	}
	c.setHull(1, len(angles))
	return c
}

// sturmian is the Sturmian tiling of slope θ with tiles 1 and φ scaled to
// mean spacing 1. Its hull is a Cantor set (the mechanical words of slope
// θ; Lothaire, Algebraic Combinatorics on Words, ch. 2) carrying the
// rotation by θ.
func sturmian(theta, noise float64) Case {
	phi := 1 / golden
	mean := (1-theta)*1 + theta*phi
	return Case{
		Class: cantor, Noise: noise,
		Spec:        design.Spec{Family: "sturmian", Theta: theta, Tiles: map[string]float64{"A": 1 / mean, "B": phi / mean}},
		Angles:      []float64{topology.Fold(theta)},
		AngleSource: "slope θ of the mechanical word",
	}
}

func noiseLabel(noise float64) string {
	return "σ" + strconv.FormatFloat(100*noise, 'g', -1, 64) + "%"
}

// Grid returns the cases of the suite, in the order they run.
func Grid(cfg Config) ([]Case, error) {
	var cases []Case
	add := func(c Case, name string) {
		if name != "" {
			c.Name = name
		}
		c.MinSites = decidingSites(c)
		cases = append(cases, c)
	}
	sizeAxis, noiseAxis, nSweep := sizes, noises, noiseSweepSites
	if cfg.Quick {
		sizeAxis, noiseAxis, nSweep = []int{100, 500}, []float64{0, 0.01, 0.02, 0.05}, 500
	}

	// The breakdown sweeps: each class's prototype over the sizes, noise
	// free and at sweepNoise, and over the noises at one size.
	for _, class := range sweepClasses {
		ns := sizeAxis
		if class == hull.Torus {
			ns = torusSizes
			if cfg.Quick {
				ns = []int{2000}
			}
		}
		for _, noise := range []float64{0, sweepNoise} {
			if class == hull.Torus && cfg.Quick && noise > 0 {
				continue
			}
			for _, n := range ns {
				c := prototype(class, n, noise)
				c.SizeSweep = true
				c.NoiseSweep = n == nSweep
				add(c, "")
			}
		}
		if class == hull.Torus && cfg.Quick {
			continue
		}
		for _, noise := range noiseAxis {
			if noise == 0 || noise == sweepNoise {
				continue // in the size sweeps
			}
			c := prototype(class, nSweep, noise)
			c.NoiseSweep = true
			add(c, "")
		}
	}

	if cfg.Quick {
		// One noise-free circle of 2000 sites for the exact-angle check,
		// one chain each through the missing-site and centroid routes.
		c := prototype(hull.Circle, 2000, 0)
		add(c, "")
		c = prototype(hull.Circle, 500, 0.01)
		c.Spec.Missing = 0.01
		add(c, "circle/missing1%/N500/σ1%")
		c = prototype(hull.Circle, 500, 0.01)
		c.Centroids = true
		add(c, "circle/centroids/N500/σ1%")
		// A slice of the issue-13 families: a dimerised circle, a small
		// torus, a decorated torus, a 3-torus, two short chains, the strong modulation.
		c = decorated(scaleToMean([]float64{0.88, 1.12}), sqrt2m1, 0.1, 0.01)
		c.Spec.Sites, c.Spec.Noise = 2000, 0.01
		add(c, "circle×2/dimer/N2000/σ1%")
		c = twoAngle(sqrt2m1, 0.1, 2-math.Sqrt(3), 0.1, 0.01)
		c.Spec.Sites, c.Spec.Noise = 300, 0.01
		add(c, "torus/small/N300/σ1%")
		c = decoratedAngles(scaleToMean([]float64{0.88, 1.12}), []float64{sqrt2m1, 2 - math.Sqrt(3)}, []float64{0.08, 0.06}, 0.01)
		c.Spec.Sites, c.Spec.Noise = 2000, 0.01
		add(c, "torus×2/cell2/N2000/σ1%")
		c = multiAngle(threeAngles, []float64{0.1, 0.08, 0.06}, 0)
		c.Spec.Sites = 5000
		add(c, "torus3/N5000/σ0%")
		for _, class := range []hull.Class{hull.Point, disordered} {
			c := shortChain(class, 16, 0.01)
			add(c, c.Name)
		}
		c = strongModulation(0.01, true)
		add(c, c.Name)
		return cases, nil
	}

	// Finite hulls: cells of 2 to 5 spacings and rational modulations
	// θ = p/q, whose chains repeat every q sites (common practice).
	for _, cell := range [][]float64{{1, 1.4}, {1, 1.3, 0.8, 1.1}, {1, 1.2, 1.4, 0.9, 1.1}} {
		c := Case{Noise: 0.01, Spec: design.Spec{Family: "periodic", Cell: scaleToMean(cell), Sites: 500, Noise: 0.01}}
		c.setHull(cellPeriodOf(cell), 0)
		add(c, fmt.Sprintf("finite/cell%d/N500/σ1%%", len(cell)))
	}
	for _, pq := range [][2]int{{1, 2}, {1, 3}, {2, 5}, {3, 7}, {3, 8}, {5, 12}, {7, 11}, {1, 12}} {
		for _, noise := range []float64{0, 0.01} {
			if noise == 0 && pq != [2]int{5, 12} {
				continue
			}
			c := modulated(float64(pq[0])/float64(pq[1]), []float64{0.1}, nil, 1, noise)
			c.setHull(pq[1], 0)
			c.Angles, c.AngleSource = nil, ""
			c.Spec.Sites, c.Spec.Noise = 500, noise
			add(c, fmt.Sprintf("finite/theta%d_%d/N500/%s", pq[0], pq[1], noiseLabel(noise)))
		}
	}

	// Circles: one harmonic at several angles (a small one and one near
	// 1/3 among them), several harmonics, deformed loops, circle maps;
	// each noise-free and at 1%, 2000 sites.
	type circle struct {
		name string
		make func() (Case, error)
	}
	circles := []circle{
		{"golden", func() (Case, error) { return modulated(golden, []float64{0.1}, nil, 1, 0), nil }},
		{"theta0.2763", func() (Case, error) { return modulated(0.2763, []float64{0.1}, nil, 1, 0), nil }},
		{"pi-3", func() (Case, error) { return modulated(math.Pi-3, []float64{0.1}, nil, 1, 0), nil }},
		{"e-2", func() (Case, error) { return modulated(math.E-2, []float64{0.1}, nil, 1, 0), nil }},
		{"small0.0618", func() (Case, error) { return modulated(golden/10, []float64{0.1}, nil, 1, 0), nil }},
		{"near1_3", func() (Case, error) { return modulated(0.3343, []float64{0.1}, nil, 1, 0), nil }},
		{"harmonics123", func() (Case, error) {
			return modulated(sqrt2m1, []float64{0.1, 0.04, 0.02}, []float64{0, 0.03}, 1, 0), nil
		}},
		{"harmonics24", func() (Case, error) {
			// Only harmonics 2 and 4 of θ: the hull turns by 2θ.
			return modulated(0.2763, []float64{0, 0.1, 0, 0.03}, nil, 2, 0), nil
		}},
		{"loop-oval", func() (Case, error) {
			return Case{Class: hull.Circle, Spec: design.Spec{Family: "loop", Step: 0.2763, Amp: 0.2, RadiusCos: []float64{0, 0.3}},
				Angles: []float64{0.2763}, AngleSource: "arc step of the construction"}, nil
		}},
		{"loop-lumpy", func() (Case, error) {
			return Case{Class: hull.Circle, Spec: design.Spec{Family: "loop", Step: golden, Amp: 0.2, RadiusSin: []float64{0.2, 0, 0.1}, Phase: 0.3},
				Angles: []float64{topology.Fold(golden)}, AngleSource: "arc step of the construction"}, nil
		}},
		{"circlemap-K0.5", func() (Case, error) { return circleMapCase(0.5) }},
		{"circlemap-K1", func() (Case, error) { return circleMapCase(1) }},
	}
	for _, cm := range circles {
		for _, noise := range []float64{0, 0.01} {
			c, err := cm.make()
			if err != nil {
				return nil, err
			}
			c.Spec.Sites, c.Spec.Noise, c.Noise = 2000, noise, noise
			add(c, fmt.Sprintf("circle/%s/N2000/%s", cm.name, noiseLabel(noise)))
		}
	}

	// A second torus, with unequal amplitudes.
	for _, noise := range []float64{0, 0.01} {
		c := twoAngle(golden, 0.1, sqrt2m1, 0.08, noise)
		c.Spec.Sites, c.Spec.Noise = 5000, noise
		add(c, fmt.Sprintf("torus/golden+sqrt2/N5000/%s", noiseLabel(noise)))
	}

	// Every prototype with 1% of its sites missing, and through centroids.
	for _, class := range sweepClasses {
		c := prototype(class, 2000, 0.01)
		c.Spec.Missing = 0.01
		add(c, fmt.Sprintf("%s/missing1%%/N2000/σ1%%", class))
	}
	for _, class := range sweepClasses {
		c := prototype(class, 2000, 0.01)
		c.Centroids = true
		add(c, fmt.Sprintf("%s/centroids/N2000/σ1%%", class))
	}

	// More negative cases: other spacing laws, the Fibonacci substitution
	// tiling (the Sturmian word of slope 1/φ²), another slope.
	add(Case{Class: disordered, Spec: design.Spec{Family: "random", Dist: "exponential", Spread: 0.3, Sites: 2000}}, "disordered/exponential0.3/N2000/σ0%")
	add(Case{Class: disordered, Spec: design.Spec{Family: "random", Dist: "uniform", Spread: 0.1, Sites: 2000}}, "disordered/uniform0.1/N2000/σ0%")
	phi := 1 / golden
	fm := (golden*1 + (1-golden)*phi) // letter A has frequency 1/φ, B 1/φ²
	add(Case{Class: cantor, Spec: design.Spec{Family: "substitution", Rule: "fibonacci", Sites: 2000, Tiles: map[string]float64{"A": 1 / fm, "B": phi / fm}},
		Angles: []float64{1 - golden}, AngleSource: "frequency 1/φ² of B (common practice)"}, "cantor/fibonacci-substitution/N2000/σ0%")
	c := sturmian(sqrt2m1, 0)
	c.Spec.Sites = 2000
	add(c, "cantor/sturmian-sqrt2/N2000/σ0%")

	// Decorated hulls: cells of p = 2, 3, 4 spacings decorating one
	// angle, 2000 sites, noise-free and at 1%; the dimerised chain
	// x_n = n + 0.12·(−1)^n-like of the issue among them.
	for _, cell := range [][]float64{{0.88, 1.12}, {0.85, 1.1, 1.05}, {0.9, 1.1, 0.95, 1.05}} {
		for _, noise := range []float64{0, 0.01} {
			c := decorated(scaleToMean(cell), sqrt2m1, 0.1, noise)
			c.Spec.Sites, c.Spec.Noise = 2000, noise
			add(c, fmt.Sprintf("%s/cell%d/N2000/%s", label(c.Class, c.Period, c.Components), len(cell), noiseLabel(noise)))
		}
	}

	// Decorated tori: cells of p = 2, 3 spacings decorating two angles
	// (√2−1, 2−√3), 2000 and 5000 sites, noise-free and at 1%.
	for _, cell := range [][]float64{{0.88, 1.12}, {0.85, 1.1, 1.05}} {
		for _, n := range []int{2000, 5000} {
			for _, noise := range []float64{0, 0.01} {
				c := decoratedAngles(scaleToMean(cell), []float64{sqrt2m1, 2 - math.Sqrt(3)}, []float64{0.08, 0.06}, noise)
				c.Spec.Sites, c.Spec.Noise = n, noise
				add(c, fmt.Sprintf("%s/cell%d/N%d/%s", label(c.Class, c.Period, c.Components), len(cell), n, noiseLabel(noise)))
			}
		}
	}

	// Tori on a few hundred sites, the angles of the issue (√2−1, 2−√3).
	for _, n := range []int{200, 300, 500, 800} {
		for _, noise := range []float64{0, 0.005, 0.01} {
			c := twoAngle(sqrt2m1, 0.1, 2-math.Sqrt(3), 0.1, noise)
			c.Spec.Sites, c.Spec.Noise = n, noise
			add(c, fmt.Sprintf("torus/small/N%d/%s", n, noiseLabel(noise)))
		}
	}

	// 3-tori of 5000 and 20000 sites.
	for _, n := range []int{5000, 20000} {
		for _, noise := range []float64{0, 0.005, 0.01} {
			c := multiAngle(threeAngles, []float64{0.1, 0.08, 0.06}, noise)
			c.Spec.Sites, c.Spec.Noise = n, noise
			add(c, fmt.Sprintf("torus3/N%d/%s", n, noiseLabel(noise)))
		}
	}

	// Short chains of every class a fabricated sample may have.
	for _, class := range []hull.Class{hull.Point, hull.Finite, hull.Circle, disordered} {
		for _, n := range shortSizes {
			for _, noise := range []float64{0, 0.01, 0.03} {
				c := shortChain(class, n, noise)
				add(c, c.Name)
			}
		}
	}

	// Strong modulation with harmonics, as positions and through a 2-D
	// scan; long independent Gaussian spacings.
	for _, noise := range []float64{0, 0.01} {
		for _, scan := range []bool{false, true} {
			c := strongModulation(noise, scan)
			add(c, c.Name)
		}
	}
	g := Case{Spec: design.Spec{Family: "random", Dist: "gaussian", Spread: 0.075, Sites: 3000}}
	g.Class = disordered
	add(g, "disordered/gaussian7.5%/N3000/σ0%")
	return cases, nil
}

// threeAngles are the angles of the 3-tori: √2−1, 2−√3 and 1/φ, with 1
// independent over the rationals (distinct quadratic irrationals from
// distinct fields; common practice).
var threeAngles = []float64{math.Sqrt2 - 1, 2 - math.Sqrt(3), (math.Sqrt(5) - 1) / 2}

// shortSizes are the sizes of the short chains.
var shortSizes = []int{16, 32, 64}

// shortChain is the prototype of a class (independent spacings: uniform,
// ±12%) on a short chain.
func shortChain(class hull.Class, n int, noise float64) Case {
	c := prototype(class, n, noise)
	if class == disordered {
		c.Spec.Spread = 0.12
	}
	c.Name = fmt.Sprintf("short/%s/N%d/%s", class, n, noiseLabel(noise))
	return c
}

// strongModulation is a circle of amplitude 0.3 of the spacing with 2nd
// and 3rd harmonics (0.1, 0.05), 700 sites, optionally through a 2-D scan.
func strongModulation(noise float64, scan bool) Case {
	c := modulated(sqrt2m1, []float64{0.3, 0.1, 0.05}, nil, 1, noise)
	c.Spec.Sites, c.Spec.Noise, c.Centroids = 700, noise, scan
	route := ""
	if scan {
		route = "/centroids"
	}
	c.Name = fmt.Sprintf("circle/strong-harmonics%s/N700/%s", route, noiseLabel(noise))
	return c
}

// scaleToMean scales a cell of spacings to mean 1.
func scaleToMean(cell []float64) []float64 {
	var s float64
	for _, v := range cell {
		s += v
	}
	out := make([]float64, len(cell))
	for i, v := range cell {
		out[i] = v * float64(len(cell)) / s
	}
	return out
}

// circleMapCase builds a sine-circle-map chain whose rotation number is
// known independently: for K = 1 at Ω = 0.6066610635, which gives the
// golden mean (Shenker, Physica D 5, 1982; Ω from memory), for K < 1 at the
// Ω found by bisection to give the golden mean; either way the reference
// is the rotation number computed from the map at that Ω (see
// circleMapRotation), not the target.
func circleMapCase(k float64) (Case, error) {
	omega := 0.6066610635
	if k < 1 {
		var err error
		if omega, err = omegaFor(golden, k); err != nil {
			return Case{}, err
		}
	}
	rho, bound, how, err := circleMapRotation(omega, k)
	if err != nil {
		return Case{}, err
	}
	return Case{
		Class:       hull.Circle,
		Spec:        design.Spec{Family: "circle-map", Omega: omega, K: k, Amp: 0.1},
		Angles:      []float64{topology.Fold(rho)},
		AngleRef:    bound,
		AngleSource: how,
	}, nil
}

// --- running one case ------------------------------------------------------

// caseSeed derives the seed of a case from the suite seed and its name, so
// that adding a case leaves the others' draws alone.
func caseSeed(seed uint64, name string) uint64 {
	h := fnv.New64a()
	io.WriteString(h, name)
	s := rand.New(rand.NewPCG(seed, h.Sum64())).Uint64()
	if s == 0 {
		s = 1 // 0 stands for the default in hull.Options
	}
	return s
}

// Geometry of the simulated centroid scan: the chain runs at a tilt across
// the scan table, each centroid scattered across the chain.
const (
	scanTiltDeg    = 3.0
	scanTransverse = 0.02 // standard deviation across the chain, in mean spacings
	scanX0, scanY0 = 12.5, 40.2
)

// throughCentroids writes the pattern as tilted x,y centroids with
// transverse scatter into an in-memory CSV file and reads it back with
// pattern.Read, so that the analysis sees what the centroid reader makes
// of a scan.
func throughCentroids(p *pattern.Pattern, seed uint64, name string) (*pattern.Pattern, error) {
	rng := rand.New(rand.NewPCG(seed, 5))
	sin, cos := math.Sincos(scanTiltDeg * math.Pi / 180)
	var buf bytes.Buffer
	buf.WriteString("# simulated centroid scan of " + name + "\nx,y\n")
	for _, s := range p.Positions {
		t := scanTransverse * rng.NormFloat64()
		x := scanX0 + s*cos - t*sin
		y := scanY0 + s*sin + t*cos
		buf.WriteString(strconv.FormatFloat(x, 'g', -1, 64) + "," + strconv.FormatFloat(y, 'g', -1, 64) + "\n")
	}
	q, err := pattern.Read(&buf, name+".csv", pattern.ReadOptions{})
	if err != nil {
		return nil, err
	}
	if q.Scan == nil || q.Scan.Dim != 2 {
		return nil, errors.New("the centroid file was not read as 2-D centroids")
	}
	return q, nil
}

// --- references --------------------------------------------------------------

// circleMapRotation returns the rotation number ρ of the sine circle map
// F(ψ) = ψ + Ω − (K/2π) sin 2πψ (a lift with F(0) = Ω), an estimate of its
// error, and how it was computed.
//
// ρ is the weighted Birkhoff average of the increment F(ψ) − ψ along an
// orbit, with the bump weight exp(−1/(t(1−t))): for a smooth conjugacy to
// the rotation it converges faster than any power of the orbit length
// (Das, Saiki, Sander & Yorke, Nonlinearity 30, 2017; from memory). At
// K = 1 the conjugacy is not smooth and nothing guarantees that rate, so
// the error is estimated from the spread of the averages over orbits of
// 2.5·10⁵, 5·10⁵ and 10⁶ steps, and the result must also lie within the
// rigorous bound of the plain average over L = 10⁶ steps,
// |(F^L(ψ) − ψ)/L − ρ| < 1/L, which holds for every lift of a circle
// homeomorphism (common practice).
func circleMapRotation(omega, k float64) (rho, bound float64, how string, err error) {
	r1 := weightedRotation(omega, k, 250_000)
	r2 := weightedRotation(omega, k, 500_000)
	rho = weightedRotation(omega, k, 1_000_000)
	bound = math.Max(math.Max(math.Abs(rho-r1), math.Abs(rho-r2)), 1e-15)
	const L = 1_000_000
	wind, frac := 0.0, 0.0
	for range L {
		frac += omega - k/(2*math.Pi)*math.Sin(2*math.Pi*frac)
		fl := math.Floor(frac)
		wind, frac = wind+fl, frac-fl
	}
	if plain := (wind + frac) / L; math.Abs(plain-rho) >= 1.0/L {
		return 0, 0, "", fmt.Errorf("circle map Ω = %v, K = %v: the weighted average %v lies outside the plain average's bound %v ± %v", omega, k, rho, plain, 1.0/L)
	}
	return rho, bound, "weighted Birkhoff average of the map's orbit", nil
}

// weightedRotation is the weighted Birkhoff average of the increment of
// the circle map over n steps from ψ = 0.
func weightedRotation(omega, k float64, n int) float64 {
	psi, sum, wsum := 0.0, 0.0, 0.0
	for i := range n {
		t := (float64(i) + 0.5) / float64(n)
		w := math.Exp(-1 / (t * (1 - t)))
		// Only the fractional part of ψ enters the increment; keeping ψ in
		// [0, 1) keeps its rounding at 1e-16.
		inc := omega - k/(2*math.Pi)*math.Sin(2*math.Pi*psi)
		sum += w * inc
		wsum += w
		psi += inc
		psi -= math.Floor(psi)
	}
	return sum / wsum
}

// omegaFor finds Ω with rotation number target for the sine circle map at
// K < 1 by bisection: the rotation number is continuous and nondecreasing
// in Ω (common practice), and an irrational target is taken at one Ω only.
func omegaFor(target, k float64) (float64, error) {
	lo, hi := 0.0, 1.0
	for range 60 {
		mid := (lo + hi) / 2
		if weightedRotation(mid, k, 20_000) < target {
			lo = mid
		} else {
			hi = mid
		}
	}
	if math.Abs(weightedRotation(lo, k, 200_000)-target) > 1e-6 {
		return 0, fmt.Errorf("circle map K = %v: no Ω gives rotation number %v", k, target)
	}
	return lo, nil
}
