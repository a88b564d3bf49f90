package lattice

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"phasonhull/pattern"
)

// hardDisks returns n points of a random sequential adsorption of disks
// of diameter 0.9 in a square of side √n (about 60% of the jamming
// density): a glass, locally ordered with no average lattice.
func hardDisks(n int, seed uint64) [][2]float64 {
	r := rand.New(rand.NewPCG(seed, 0xd15c))
	side := math.Sqrt(float64(n))
	var out [][2]float64
	for tries := 0; len(out) < n && tries < 1000*n; tries++ {
		p := [2]float64{r.Float64() * side * 1.3, r.Float64() * side * 1.3}
		ok := true
		for _, q := range out {
			if norm2([2]float64{p[0] - q[0], p[1] - q[1]}) < 0.81 {
				ok = false
				break
			}
		}
		if ok {
			out = append(out, p)
		}
	}
	return out
}

// The calibration of the refusal rule (stated in the package
// documentation): how often a lattice is found in sets that have none
// (Poisson sets and hard-disk glasses; the goal and the measured count
// are 0) and how often a lattice with 5% position noise, 5% missing and
// 2% spurious sites, or displaced by a wave of amplitude 0.15, is
// refused (measured: 0). Each count is over 200 seeded draws per size.
func TestNoLatticeCalibration(t *testing.T) {
	draws := 200
	if testing.Short() {
		draws = 20
	}
	found := func(pts [][2]float64) (bool, error) {
		p, err := pattern.NewPlane(pts, "", "calibration")
		if err != nil {
			t.Fatal(err)
		}
		_, err = Recover(context.Background(), p, Options{})
		if err != nil && !errors.Is(err, ErrNoLattice) {
			t.Fatal(err)
		}
		return err == nil, err
	}
	for _, n := range []int{16, 64, 256, 1024} {
		wrong := 0
		for d := range draws {
			if ok, _ := found(poisson(n, uint64(1000*n+d))); ok {
				wrong++
			}
		}
		t.Logf("Poisson, %d sites: a lattice found in %d of %d draws", n, wrong, draws)
		if wrong != 0 {
			t.Errorf("Poisson, %d sites: a lattice found in %d of %d draws, want 0", n, wrong, draws)
		}
	}
	for _, n := range []int{64, 256} {
		wrong := 0
		for d := range draws {
			if ok, _ := found(hardDisks(n, uint64(1000*n+d))); ok {
				wrong++
			}
		}
		t.Logf("hard-disk glass, %d sites: a lattice found in %d of %d draws", n, wrong, draws)
		if wrong != 0 {
			t.Errorf("hard-disk glass, %d sites: a lattice found in %d of %d draws, want 0", n, wrong, draws)
		}
	}
	bases := [][2][2]float64{square, hex, oblique}
	for _, side := range []int{8, 16, 32} {
		for _, modulated := range []bool{false, true} {
			refused := 0
			var reason error
			for d := range draws {
				r := rand.New(rand.NewPCG(uint64(side), uint64(d)))
				c := plate{basis: bases[d%3], n1: side, n2: side, rot: 2 * math.Pi * r.Float64(),
					noise: 0.05, missing: 0.05, extra: 0.02, seed: uint64(d)}
				if modulated {
					ang := 2 * math.Pi * r.Float64()
					c.waves = []wave{{q: [2]float64{r.Float64() * 0.5, r.Float64() * 0.5}, amp: 0.15,
						pol: [2]float64{math.Cos(ang), math.Sin(ang)}, phase: r.Float64()}}
				}
				if ok, err := found(points(c.sites())); !ok {
					refused++
					reason = err
				}
			}
			t.Logf("lattices %d × %d (modulated %v): refused %d of %d draws", side, side, modulated, refused, draws)
			if refused != 0 {
				t.Errorf("lattices %d × %d (modulated %v): refused %d of %d draws, want 0; last: %v", side, side, modulated, refused, draws, reason)
			}
		}
	}
}
