package hull

import (
	"bytes"
	"context"
	"math/rand/v2"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/lattice"
)

// A Poisson set of points has no average lattice (common practice: its
// structure factor is flat, S(k) ≈ 1 away from k = 0), so AnalyzeSites
// reads it as disordered with the recovery's reason, not as an error, and
// its text form says so without a lattice or an embedding.
func TestAnalyzeSitesPoissonIsDisordered(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	pts := make([][2]float64, 900)
	for i := range pts {
		pts[i] = [2]float64{30 * rng.Float64(), 30 * rng.Float64()}
	}
	p, err := pattern.NewPlane(pts, "um", "poisson")
	if err != nil {
		t.Fatal(err)
	}
	res, l, err := AnalyzeSites(context.Background(), pattern.Sites{Plane: p}, lattice.Options{}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Hull.Class != Disordered || l != nil || res.Dimension != 2 || res.Lattice != nil || res.Source != "poisson" {
		t.Fatalf("class %s, lattice %v, dimension %d, source %q", res.Hull.Class, l != nil, res.Dimension, res.Source)
	}
	if !strings.Contains(res.Hull.Reason, "no average lattice") {
		t.Errorf("reason %q does not give the recovery's refusal", res.Hull.Reason)
	}
	var b bytes.Buffer
	if err := res.WriteText(&b, false); err != nil {
		t.Fatal(err)
	}
	if out := b.String(); !strings.Contains(out, "no average lattice") || strings.Contains(out, "embedding") {
		t.Errorf("text form:\n%s", out)
	}
}

// A chain goes through AnalyzeContext unchanged, and exactly one of chain
// and plane is wanted.
func TestAnalyzeSitesChain(t *testing.T) {
	pos := make([]float64, 120)
	for i := range pos {
		pos[i] = float64(i)
	}
	c, err := pattern.New(pos, "", "chain")
	if err != nil {
		t.Fatal(err)
	}
	res, l, err := AnalyzeSites(context.Background(), pattern.Sites{Chain: c}, lattice.Options{}, Options{})
	if err != nil || l != nil || res.Dimension != 1 || res.Hull.Class != Point {
		t.Fatalf("class %v, lattice %v, err %v", res.Hull.Class, l, err)
	}
	if _, _, err := AnalyzeSites(context.Background(), pattern.Sites{}, lattice.Options{}, Options{}); err == nil {
		t.Error("no sites accepted")
	}
}
