package rips_test

import (
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"testing"

	"phasonhull/topology/rips"
	"phasonhull/topology/rips/ripstest"
)

// The reference is Debian's ripser package (version 1.2.1): the binary
// ripser for Z/2 and ripser-coeff for other primes. It reads coordinates
// and computes distances in single precision and prints lengths with six
// significant digits. The clouds below are therefore put on a dyadic grid
// (ripstest.Quantize), where both programs compute every squared distance
// exactly and order all distances the same way; our double-precision
// lengths, rounded to single precision, are then the reference's lengths
// bit for bit, and both are printed with six significant digits and
// compared as text.

// referenceBinary finds a reference binary, skipping the test when it is
// missing — except under CI, where the reference checks are required.
func referenceBinary(t *testing.T, name string) string {
	t.Helper()
	path, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s (Debian package ripser) is required under CI for the reference checks: %v", name, err)
		}
		t.Skipf("%s (Debian package ripser) not found; skipping the reference check", name)
	}
	return path
}

type refCase struct {
	name      string
	pts       [][]float64
	dim       int
	threshold float64 // 0: the radius of the cloud
	prime     int     // 0: 2
}

// referenceBattery is the list of clouds checked against the reference.
func referenceBattery() []refCase {
	q := ripstest.Quantize
	mod := ripstest.ModulatedSpacings(400, 0.2763, 0.12)
	two := ripstest.TwoAngleSpacings(3000, (math.Sqrt(5)-1)/2, math.Sqrt(2)-1, 0.3, 0.2)
	cases := []refCase{
		{name: "cube3", pts: q(ripstest.Cube(120, 3, 1)), dim: 2},
		{name: "cube4", pts: q(ripstest.Cube(70, 4, 2)), dim: 2},
		{name: "noisy-circle", pts: q(ripstest.Circle(120, 0.08, 3)), dim: 2},
		{name: "circle", pts: q(ripstest.Circle(90, 0, 4)), dim: 2},
		{name: "sphere", pts: q(ripstest.Sphere(110, 5)), dim: 2},
		{name: "torus-R3", pts: q(ripstest.Torus(150, 2, 1, 6)), dim: 2},
		{name: "flat-torus-R4", pts: q(ripstest.FlatTorus(150, 7)), dim: 2},
		{name: "modulated-delay-R3", pts: q(ripstest.MaxMin(ripstest.Delay(mod, 3), 120)), dim: 2},
		{name: "two-angle-delay-R4", pts: q(ripstest.MaxMin(ripstest.Delay(two, 4), 150)), dim: 2},
		{name: "figure-eight", pts: q(ripstest.FigureEight(120, 0.05, 8)), dim: 2},
		{name: "gaussian-R2", pts: q(ripstest.Gaussian(120, 2, 9)), dim: 2},
		{name: "clusters-R3", pts: q(ripstest.Clusters(100, 4, 3, 0.05, 10)), dim: 2},
		{name: "projective-plane", pts: q(ripstest.ProjectivePlane(120, 11)), dim: 2},
		{name: "lattice-ties", pts: lattice(5, 4, 3), dim: 2},
		{name: "cube3-H3", pts: q(ripstest.Cube(40, 3, 12)), dim: 3},
		{name: "polygon-12", pts: q(ripstest.RegularPolygon(12)), dim: 2},
		{name: "repeated-points", pts: repeated(q(ripstest.Sphere(60, 17)), 20), dim: 2},
	}
	// Threshold below the cloud's radius: halfway between two
	// consecutive distinct lengths, so that both programs admit the same
	// edges whatever their precision.
	cube := q(ripstest.Cube(100, 3, 13))
	cases = append(cases, refCase{name: "cube3-threshold", pts: cube, dim: 2, threshold: midLength(cube, 0.3)})
	circ := q(ripstest.Circle(100, 0.05, 14))
	cases = append(cases, refCase{name: "noisy-circle-threshold", pts: circ, dim: 2, threshold: midLength(circ, 0.2)})
	// Z/3 coefficients, where the projective plane differs from Z/2.
	cases = append(cases,
		refCase{name: "projective-plane-Z3", pts: q(ripstest.ProjectivePlane(120, 11)), dim: 2, prime: 3},
		refCase{name: "torus-R3-Z3", pts: q(ripstest.Torus(120, 2, 1, 15)), dim: 2, prime: 3},
		refCase{name: "cube3-Z5", pts: q(ripstest.Cube(80, 3, 16)), dim: 2, prime: 5},
	)
	return cases
}

// repeated returns pts followed by copies of its first k points.
func repeated(pts [][]float64, k int) [][]float64 {
	return append(slices.Clone(pts), pts[:k]...)
}

// lattice returns the integer points of an a×b×c box: many equal lengths,
// which exercise the tie-breaking of the filtration.
func lattice(a, b, c int) [][]float64 {
	var pts [][]float64
	for i := 0; i < a; i++ {
		for j := 0; j < b; j++ {
			for k := 0; k < c; k++ {
				pts = append(pts, []float64{float64(i), float64(j), float64(k)})
			}
		}
	}
	return pts
}

// midLength returns the midpoint between the distinct pairwise lengths at
// quantile q and the next one.
func midLength(pts [][]float64, q float64) float64 {
	var ds []float64
	for i := range pts {
		for j := 0; j < i; j++ {
			ds = append(ds, dist(pts[i], pts[j]))
		}
	}
	slices.Sort(ds)
	ds = slices.Compact(ds)
	k := int(q * float64(len(ds)-1))
	return (ds[k] + ds[k+1]) / 2
}

func dist(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		d := a[i] - b[i]
		s += d * d
	}
	return math.Sqrt(s)
}

// writeCloud writes the cloud to a temporary file in the reference's
// point-cloud format and returns its path.
func writeCloud(t *testing.T, pts [][]float64) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "cloud.txt")
	if err := ripstest.WriteCloud(path, pts); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestAgainstReference(t *testing.T) {
	z2 := referenceBinary(t, ripstest.ReferenceProgram(2))
	zp := referenceBinary(t, ripstest.ReferenceProgram(3))
	battery := referenceBattery()
	if testing.Short() {
		battery = battery[:6]
	}
	for _, c := range battery {
		t.Run(c.name, func(t *testing.T) {
			path := writeCloud(t, c.pts)
			bin := z2
			if ripstest.ReferenceProgram(c.prime) != "ripser" {
				bin = zp
			}
			want, err := ripstest.RunReference(bin, path, c.dim, c.prime, c.threshold)
			if err != nil {
				t.Fatal(err)
			}
			d, err := rips.VietorisRips(c.pts, rips.Options{MaxDim: c.dim, Threshold: c.threshold, Prime: c.prime})
			if err != nil {
				t.Fatal(err)
			}
			got := ripstest.FormatBars(d.Bars)
			if onlyOurs, onlyRef := ripstest.Diff(got, want); len(onlyOurs)+len(onlyRef) > 0 {
				t.Errorf("%d points, dim %d: %d bars here, %d in the reference\nonly here: %v\nonly in the reference: %v",
					len(c.pts), c.dim, len(got), len(want), head(onlyOurs), head(onlyRef))
			}
		})
	}
}

func head(s []string) []string {
	if len(s) > 20 {
		return append(s[:20:20], fmt.Sprintf("… %d more", len(s)-20))
	}
	return s
}
