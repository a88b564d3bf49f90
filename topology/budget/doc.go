// Package budget finds the fabrication error budget of a design: how
// precisely its sites must be placed for a spectral gap, its boundary
// states and its hull to survive fabrication.
//
// # Trials
//
// Run draws, at each error Level — a Gaussian position error σ on every
// site, a fraction of sites missing at random, a linear scale drift —
// Options.Trials samples of the design (default 200) and measures each
// through a Sampler: Chain generates a one-dimensional design spec with the
// level's perturbations (package design) and analyses the spectrum of an
// operator on it (package spectrum), labelling its gaps by the design's
// angles. A design of another dimension plugs in by implementing Sampler.
// Trial i is seeded by TrialSeed(Options.Seed, i) at every level, so the
// result depends on the seed alone, not on the number of workers, and a
// larger σ moves each sample's sites further the same way (common random
// numbers).
//
// For each of the design's labelled gaps wider than MinWidth (default the
// smallest gap the design's spectrum resolves), matched in every trial by
// its label rather than its index, a level reports the share of trials in
// which it stays open, with the Wilson score interval (Wilson, J. Am.
// Stat. Assoc. 22, 1927) at IntervalLevel; the median and 5–95% range of
// its width (0 where it closed) and of its centre; and the share of trials
// whose boundary states still cross it m times per turn of the phase
// (spectrum.EdgeModes). The hull analysis (hull.Analyze: is the class the
// design's, and the spread of the recovered angle) costs about 30 spectra
// and a phase sweep about 100, far more in strong disorder, where the sweep
// refines its steps; they are measured on the first HullTrials and
// EdgeTrials trials of each level only, and the result says so.
//
// # The budget
//
// With Options.Gap set, Run finds the largest σ whose estimated survival of
// that gap is at least Options.Confidence: the levels already run bracket
// it (σ is doubled from the largest until the gap falls short), and the
// bracket is halved until it is 1% of its upper end, or until the Wilson
// intervals at its two ends overlap (the trials can no longer tell them
// apart), each probe running the same trials. The answer carries its Monte Carlo error: Budget.Low is
// a σ where the whole Wilson interval lies at or above the confidence,
// Budget.High one where it lies below; between them the trials cannot
// tell. A target gap the design itself does not open is refused, naming
// the gaps it does open.
//
// Result has the JSON form Schema (phasonhull.budget/1); WriteText writes
// it for a reader.
package budget
