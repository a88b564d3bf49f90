// Package lattice recovers the average lattice of a two-dimensional point
// set: its basis vectors with their uncertainty, the lattice index of every
// site, the sites that sit on no lattice point, and the displacement field
// of the sites from their lattice points.
//
// # Method
//
// Recover works in four stages, none of which depends on the order of the
// sites, on the position or on the rotation of the patch:
//
//  1. Neighbour vectors. The site nearest the centroid is the centre;
//     the 4096 sites nearest it go into a k-d tree (gonum spatial/kdtree),
//     and the difference vectors from the 1024 nearest (all sites of a
//     plane of up to 256) to their 16 nearest neighbours are clustered
//     (radius 0.45 of the median nearest-neighbour distance). A lattice
//     vector is a cluster that at least half of these anchor sites
//     contribute to (Options.MinShare); a1 is the shortest, a2 the
//     shortest at more than 11.5° from a1. Spurious sites add scattered
//     vectors that form no such cluster, missing sites thin the clusters
//     a little, and the cluster mean averages a displacement wave out.
//  2. Growing least squares. Sites are indexed by rounding their
//     coordinates in the basis, n = round(b·(x − origin)), and the
//     lattice (origin, a1, a2) refitted by linear least squares on the
//     sites within the tolerance, in regions around the centre that grow
//     by 1.5 in radius per stage, twice per stage, so that the
//     extrapolation to the next region stays well inside half a lattice
//     step even when the first basis is off by a per cent. The first
//     origin is the circular mean of the fractional coordinates of the
//     first sites, so that a spurious centre does not shift it by half a
//     cell. A displacement wave is not fitted: the least-squares lattice
//     over the whole patch is the mean lattice. When the seed basis spans
//     a sublattice of index 2 (a wave near the zone boundary splits the
//     neighbour vectors of one basis step in two) and so leaves more than
//     a tenth of the sites off, the three lattices that double it are
//     fitted too and the one holding the most sites is kept.
//  3. One site per lattice point. A site farther than Options.Tolerance
//     (default 0.4) of |a1| from its lattice point sits on no lattice
//     point; of two sites on one lattice point the farther one; and a site
//     none of whose four lattice neighbours n ± e1, n ± e2 carries a site
//     (a spurious site outside the patch near a lattice point). These have
//     OnLattice false, and the lattice is refitted on the others.
//     Missing counts the lattice points inside or on the convex hull of the
//     indices of the sites on the lattice that carry no site.
//  4. The basis. It is Lagrange–Gauss reduced and right-handed, and chosen
//     the same way whatever basis of the lattice the fit ends in: a1 the
//     shortest lattice vector (of equally short ones, to within 10⁻⁹, the
//     one of smallest polar angle), a2 the shortest with a1 × a2 > 0 (of
//     equally short ones, the first counterclockwise from a1). Its
//     uncertainty is, component by component, the larger of the
//     least-squares standard error from the residuals and a delete-one-
//     block jackknife over 4 × 4 blocks of the index range: the first
//     assumes independent residuals, the second holds when a displacement
//     wave or a drift makes them correlated across the patch.
//
// # Sets with no average lattice
//
// Recover refuses with ErrNoLattice, wrapped with the reason, a set
// where no neighbour vector is shared by half of the anchors, whose shared
// neighbour vectors lie along one line, where fewer than 60% of the sites
// sit on the fitted lattice (Options.MinOnLattice), or where either
// Bragg peak S(b_i)/N of the reciprocal basis is below 0.1 of a perfect
// lattice's (Options.MinBragg; a lattice with 5% position noise keeps
// about 0.9 by the Debye–Waller factor e^{−4π²σ²|b|²}, one displaced by a
// wave of amplitude 0.15 keeps J₀(2π·0.15·|b|)² ≥ 0.5).
//
// Calibration (TestNoLatticeCalibration, 200 seeded draws for each line):
// Poisson sets of 16, 64, 256 and 1024 sites and hard-disk glasses of 64
// and 256 sites: a lattice found in 0 draws (the goal). Square, hexagonal
// and oblique lattices of 8 × 8, 16 × 16 and 32 × 32 sites, randomly
// rotated, with 5% position noise, 5% missing and 2% spurious sites, with
// and without a displacement wave of amplitude 0.15 (random wave vector
// and polarisation): refused in 0 draws.
//
// # Limits
//
// The second basis vector must be among the 16 nearest neighbours of most
// sites: |a2| up to about 4|a1|. A displacement larger than the tolerance
// (above about 0.25 of the spacing with 5% noise) puts sites off the
// lattice; a warning says when 1% of the sites come near the tolerance.
// A set with two or more sites per lattice cell (a honeycomb, a decorated
// lattice) is not a lattice of sites: about half its sites leave the
// lattice and it is refused.
//
// # Cost
//
// Time and memory are linear in the number of sites beyond the fixed cost
// of the neighbour stage (BenchmarkRecover: 10⁴, 10⁵ and 10⁶ sites).
package lattice
