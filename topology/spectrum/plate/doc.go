// Package plate computes spectra of operators on a two-dimensional pattern
// of sites (a plate) that sits on an average lattice: the gaps, their
// integrated density of states (IDS) and their labels in the 2D gap-label
// group, with a uniform magnetic flux as the reference model of the
// quantum Hall effect.
//
// # Operators
//
// New builds a sparse Hermitian Operator from a lattice.Lattice and the
// site positions: hopping or springs (spectrum.Kind) on the bonds between
// nearest lattice neighbours, or between all sites closer than a cutoff,
// with the couplings of the 1D spectrum's laws (spectrum.Law) at the
// bond's length; on-site terms, among them a potential V(ψ_n) of the phase
// field ψ_n = ψ0 + A·n; a flux α per lattice cell by Peierls phases in the
// Landau gauge (Flux, ParseFlux: "3/11" or "0.25"); open or periodic ends
// (periodic ends with a flux p/q need q | L1, and are refused otherwise).
// The matrix is held in compressed rows with int32 column indices and
// complex128 values.
//
// # Spectra
//
// Up to DenseLimit sites Eigenvalues computes every level (a complex
// operator through the real symmetric 2n×2n embedding). Beyond, NewDensity
// estimates the density of states and the IDS by the kernel polynomial
// method (Weiße, Wellein, Alvermann & Fehske, Rev. Mod. Phys. 78, 275,
// 2006): Chebyshev moments of the rescaled operator, a Jackson kernel, and
// a stochastic trace over random-phase vectors run in parallel, seeded and
// cancellable. Its energy resolution is about π·a/M (a the half-width of
// the spectrum's bounds, M the number of moments), and the statistical
// error of an IDS is the spread over the R vectors over √R, which falls as
// 1/√(R·N) for N sites.
//
// # Gaps and labels
//
// Analyze finds the gaps: between consecutive levels, or on the KPM curve
// the intervals where the density of states stays below a floor, wider
// than the resolution, with edges located to about the resolution. Each
// gap carries its IDS ± error and the label of least order in the group
// Z + Σ Z·g_i of the generators given (the entries of the rotation A,
// det A, and the flux α), within a tolerance of three errors plus the
// boundary sites' share (Operator.Boundary); a gap that no label fits, or
// that two labels of the same least order fit, is left unlabelled. Each
// label says by its Chance how likely so close a label of its order would
// be at a random IDS: in a group of many generators a wide tolerance
// finds a label of low order by coincidence, and a sweep of a parameter,
// not one spectrum, confirms a label.
//
// # Samples, sweeps and edge states
//
// A Sample is a plate with its lattice and the rotation matrix A that
// labels its gaps: DesignSample takes A from a design's closed form,
// NewSample from the hull analysis of a plane (hull.AnalyzePlane). A
// Config (a Model, the strength of a potential of the design's phase, and
// the Options) runs on a sample. Sweep moves one parameter — a design's
// (twist, scale, amp, …), the potential's strength or the flux — follows
// each gap from one value to the next and fits its IDS as a line
// n + Σ m_i·g_i with integers over the raw generators (A_ij, det A, α); a
// label is confirmed when exactly one such line of bounded order holds at
// every value and the sweep moves the generators by more than the
// tolerance. EdgeStates cuts a sample to a strip closed along a2 and counts
// the states crossing each gap on one edge as the phase across the seam
// turns once: the Hall conductance of the filled bands (for flux p/q, the
// t_r of the label r/q = s_r + t_r·α). Request runs a spectrum with either,
// into the Report that "phasonhull spectrum" prints.
package plate
