package lattice

// Lattice is the average lattice of a plane of sites and where each site
// sits on it.
//
// Invariant: Index, OnLattice and Displacement have one entry per site of
// the plane they were recovered from, in its order; a site off the
// lattice has OnLattice false, Index (0, 0) and a NaN Displacement.
type Lattice struct {
	// Basis holds the two basis vectors a1 = Basis[0], a2 = Basis[1] as
	// (x, y) in the plane's unit: Lagrange–Gauss reduced (|a1| ≤ |a2|,
	// |a1·a2| ≤ |a1|²/2) and right-handed (a1 × a2 > 0).
	Basis [2][2]float64
	// BasisUncertainty holds one standard uncertainty of each component
	// of Basis.
	BasisUncertainty [2][2]float64
	// Origin is the position of the lattice point n = (0, 0).
	Origin [2]float64
	// Index is the lattice index n = (n1, n2) of each site: the site sits
	// near Origin + n1·a1 + n2·a2.
	Index [][2]int
	// OnLattice is false for a site that sits on no lattice point (a
	// spurious site, or a second site on a lattice point already taken).
	OnLattice []bool
	// Displacement u_n of each site from its lattice point, in the unit.
	Displacement [][2]float64
	// Missing is the number of lattice points inside the patch that carry
	// no site.
	Missing int
	// Unit is the plane's unit.
	Unit string
	// Notes say what the recovery did, one sentence each; Warnings what a
	// reader of a result should know before relying on it.
	Notes    []string
	Warnings []string
}
