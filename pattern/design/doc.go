// Package design generates point patterns from design families: the chains
// of sites a designer lays out before a sample is fabricated, and the
// perturbations fabrication adds to them.
//
// A design is a Spec, a plain struct whose JSON form (read by ReadSpec) uses
// the same names as the flags of "phasonhull generate". Generate turns a
// valid Spec into a *pattern.Pattern whose Source is "generated" and whose
// Notes record the family and every parameter.
//
// # Families
//
// A family is a Family constant with one entry in the family table
// (family.go): its parameters, its help text, its checks and generator,
// what its spec fixes in closed form (Spec.ClosedForm: a period, or the
// construction's rotation numbers) and the parameter that moves its
// pattern along its hull (Family.PhaseParam, Spec.ShiftPhase).
//
// Positions are in the pattern's unit; L is the mean spacing (field
// "spacing", default 1) of the families that use one.
//
//   - periodic: a repeated cell of spacings ("cell": [1, 1.5] gives the
//     spacings 1, 1.5, 1, 1.5, ...).
//   - modulated: x_n = n·L + Σ_k (a_k sin 2πk(nθ+φ) + b_k cos 2πk(nθ+φ)),
//     one angle θ ("theta"), phase φ ("phase"), sine amplitudes a_k ("sin")
//     and cosine amplitudes b_k ("cos"); "amp" is shorthand for a_1.
//   - decorated: a periodic cell of p spacings ("cell") decorating a
//     modulation of one angle, x_n = Σ_{m<n} cell[m mod p] + Σ_k (a_k sin
//     2πk(nθ+φ) + b_k cos 2πk(nθ+φ)) ("theta", "phase", "sin", "cos"). Its
//     hull is p circles (ClosedForm.Components); "cell": [0.88, 1.12] with
//     "sin": [0.1] is the dimerised chain n − 0.06 + 0.06·(−1)^n +
//     0.1 sin 2π(nθ+φ). With "thetas", "amps" and "phases" (as in
//     multi-angle) instead of "theta", "sin" and "cos", the cell decorates
//     Σ_k a_k sin 2π(nθ_k+φ+φ_k) over one to three angles: p d-tori.
//   - loop: sites a fixed arc length apart along the closed plane curve
//     r(φ) = R(1 + Σ_k (c_k cos kφ + s_k sin kφ)) ("radius-cos",
//     "radius-sin"); the arc step is the fraction "step" of the perimeter,
//     so the construction's rotation number is exactly "step", and
//     x_n = n·L + amp·X_n/R, X_n the curve point's first coordinate. The
//     first site sits at the arc fraction "phase" from φ = 0.
//   - circle-map: x_n = n·L + amp·sin 2πψ_n along an orbit of the sine
//     circle map ψ_{n+1} = ψ_n + Ω − (K/2π) sin 2πψ_n ("omega", "k",
//     ψ_0 = "phase"), 0 ≤ K ≤ 1.
//   - two-angle: x_n = n·L + a sin 2π(nθ1+φ1) + a2 sin 2π(nθ2+φ2)
//     ("theta", "phase", "amp", "theta2", "phase2", "amp2").
//   - multi-angle: x_n = n·L + Σ_k a_k sin 2π(nθ_k+φ_k) over one to three
//     angles ("thetas", "amps", one per angle, and "phases", missing ones
//     0); with 1, θ_1, ..., θ_d rationally independent its hull is the
//     d-torus. Two angles give the two-angle family's sites.
//   - sturmian: two tiles ("tiles") ordered by the mechanical word of slope
//     θ ("theta") and intercept ρ ("intercept"): tile n is the letter that
//     sorts second when ⌊(n+1)θ+ρ⌋ − ⌊nθ+ρ⌋ = 1 and the first letter
//     otherwise, so the second letter has frequency θ.
//   - substitution: the tile word of a substitution rule ("rule": fibonacci,
//     thue-morse, period-doubling, or a rule like "A=AB,B=A"), iterated from
//     the first letter of the rule.
//   - random: independent spacings ("dist" uniform, exponential or
//     gaussian, "spread").
//
// # Plates
//
// The two-dimensional families make plates of sites (GeneratePlane, a
// *pattern.Plane); Family.Dimension tells them apart, Families lists the
// families of chains and PlaneFamilies those of plates. "sites" is the
// number of sites per side (default 40: a 40 × 40 patch of 1600 sites),
// on a square or hexagonal lattice ("lattice": square, hex) of step
// "spacing" (default 1), a1 = (a, 0) and a2 = (0, a) or (a/2, a√3/2). A
// site n = (n1, n2) is displaced by a field of the torus coordinate
// ψ_n = ψ0 + A·n mod 1 (Spec.Rotation gives A, d × 2, in turns per
// lattice step):
//
//   - plate: A = "rotation", d = 0 to 3 rows of 2 numbers, and
//     u(ψ) = Σ_k a_k·ê_k·sin 2πψ_k, a_k = "amps", ψ0 = "phases" (missing
//     ones 0), ê_k along the wave of row k in real space (longitudinal)
//     or at "polar" degrees from the x axis. A rational A repeats on a
//     supercell (a finite hull); d = 0 is the bare lattice.
//   - twisted: a lattice on a periodic potential turned against it,
//     A = s·R(twist), R the rotation matrix, "twist" in degrees, s =
//     "scale" (default 1), and u(ψ) = amp·(ê1 sin 2πψ1 + ê2 sin 2πψ2), ê1
//     and ê2 the x and y axes turned by the twist.
//
// The amplitudes must keep every site inside its Voronoi cell, so that no
// two sites can meet; larger ones are refused. Plates take the
// perturbations missing, extra (spurious sites placed uniformly in the
// patch) and noise (isotropic: that standard deviation on each
// coordinate), in that order; drift is for chains only.
//
// # Perturbations
//
// Any family can be perturbed the way fabrication perturbs a sample. The
// perturbations are applied in this fixed order, each from its own random
// stream derived from "seed" (default 1), so that changing one leaves the
// others' choices alone:
//
//  1. missing: the fraction of sites removed, chosen uniformly;
//  2. extra: spurious sites, as a fraction of the design's sites, inserted
//     at uniform random places between the first and the last site;
//  3. noise: Gaussian position noise of that standard deviation on every
//     site (sites it reorders are sorted back);
//  4. drift: a linear scale drift x → x0 + u·(1 + drift·u/span), u = x − x0,
//     x0 the first site and span the chain's length, so that the local
//     scale grows from 1 at the first site to 1 + 2·drift at the last.
//
// Removing or inserting sites (or reordering them) drops the tile word.
package design
