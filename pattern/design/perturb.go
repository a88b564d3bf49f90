package design

import (
	"fmt"
	"slices"
)

// perturb applies the spec's perturbations to a base design in the
// documented order — missing, extra, noise, drift — and returns the new
// positions, the tile word that still matches them ("" once sites have
// been removed, inserted or reordered) and one note per perturbation.
func perturb(s Spec, b base) (pos []float64, word string, notes []string) {
	pos, word = slices.Clone(b.pos), b.word
	n := len(pos)

	if k := countOf(s.Missing, s.Sites); k > 0 {
		// Remove k sites chosen uniformly without replacement: the first
		// k entries of a seeded permutation.
		drop := make([]bool, n)
		for _, i := range newRand(s.Seed, streamMissing).Perm(n)[:k] {
			drop[i] = true
		}
		kept := pos[:0]
		for i, x := range pos {
			if !drop[i] {
				kept = append(kept, x)
			}
		}
		pos = kept
		notes = append(notes, fmt.Sprintf("removed %d of %d sites at random (missing = %s, seed %d)", k, n, formatFloat(s.Missing), s.Seed))
	}

	if k := countOf(s.Extra, s.Sites); k > 0 {
		// Insert k sites uniformly between the first and the last site.
		rng := newRand(s.Seed, streamExtra)
		lo, span := pos[0], pos[len(pos)-1]-pos[0]
		for range k {
			pos = append(pos, lo+span*rng.Float64())
		}
		slices.Sort(pos)
		notes = append(notes, fmt.Sprintf("inserted %d spurious sites at random places (extra = %s, seed %d)", k, formatFloat(s.Extra), s.Seed))
	}

	if s.Missing > 0 || s.Extra > 0 {
		if word != "" {
			notes = append(notes, "the tile word was dropped: sites were removed or inserted, so it no longer matches the positions")
		}
		word = ""
	}

	if s.Noise > 0 {
		rng := newRand(s.Seed, streamNoise)
		for i := range pos {
			pos[i] += s.Noise * rng.NormFloat64()
		}
		notes = append(notes, fmt.Sprintf("added Gaussian position noise of standard deviation %s (seed %d)", formatFloat(s.Noise), s.Seed))
		if !slices.IsSorted(pos) {
			slices.Sort(pos)
			notes = append(notes, "the noise reordered some neighbouring sites; they have been sorted")
			if word != "" {
				notes = append(notes, "the tile word was dropped: the sites were reordered")
			}
			word = ""
		}
	}

	if s.Drift != 0 {
		// x → x0 + u(1 + drift·u/span), u = x − x0: the local scale
		// 1 + 2·drift·u/span stays positive for drift > −1/2, so the order
		// of the sites is kept.
		x0, span := pos[0], pos[len(pos)-1]-pos[0]
		for i, x := range pos {
			u := x - x0
			pos[i] = x0 + u*(1+s.Drift*u/span)
		}
		notes = append(notes, fmt.Sprintf("applied a linear scale drift %s: the local scale grows from 1 at the first site to %s at the last",
			formatFloat(s.Drift), formatFloat(1+2*s.Drift)))
	}
	return pos, word, notes
}
