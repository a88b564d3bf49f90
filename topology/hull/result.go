package hull

import (
	"bytes"
	"encoding/json"
	"strconv"

	"phasonhull/topology"
	"phasonhull/topology/rips"
)

// Schema names the layout of Result in JSON; it changes whenever a field
// changes meaning.
const Schema = "phasonhull.analysis/1"

// Class names the kind of hull.
type Class string

// The classes of hull Analyze can name.
const (
	// Point: a periodic chain with one site per period (all spacings
	// equal up to noise).
	Point Class = "point"
	// Finite: a periodic chain with p > 1 sites per period; its hull is p
	// points.
	Finite Class = "finite"
	// Circle: one incommensurate angle.
	Circle Class = "circle"
	// Torus: two incommensurate angles (a two-dimensional torus).
	Torus Class = "torus"
	// Torus3: three incommensurate angles (a three-dimensional torus).
	Torus3 Class = "torus3"
	// Cantor: a tiling of a few tile lengths with an aperiodic word of
	// low complexity (Sturmian, substitution): its hull is a Cantor set.
	Cantor Class = "cantor"
	// Disordered: no low-dimensional hull at the resolution of the data.
	Disordered Class = "disordered"
	// Unresolved: the data cannot decide; Hull.Reason says why and what
	// would decide it.
	Unresolved Class = "unresolved"
)

// Result is everything Analyze found. Its JSON form is documented field by
// field in the README.
type Result struct {
	Schema string `json:"schema"`
	// Dimension is 1 for a chain (Analyze) and 2 for a plane
	// (AnalyzePlane).
	Dimension   int     `json:"dimension"`
	Source      string  `json:"source"`
	Sites       int     `json:"sites"`
	Unit        string  `json:"unit"`
	MeanSpacing float64 `json:"mean_spacing"`

	Hull Hull `json:"hull"`

	// Angles are the effective step angles in turns, folded into [0, ½]:
	// one for a circle, a canonical basis of two for a torus, none
	// otherwise. AngleUncertainty holds one standard uncertainty each.
	Angles           []float64 `json:"angles"`
	AngleUncertainty []float64 `json:"angle_uncertainty"`
	// AngleMethod says how the angles were measured.
	AngleMethod string `json:"angle_method,omitempty"`

	// Lattice is the average lattice of a plane; nil for a chain.
	Lattice *LatticeReport `json:"lattice,omitempty"`
	// Rotation is the rotation matrix A of a plane's hull, d rows (the
	// torus coordinates) of 2 entries (the lattice steps a1, a2), in turns
	// per lattice step, in the reduced form AnalyzePlane describes; for a
	// finite hull the rational A of its supercell. RotationUncertainty
	// holds one standard uncertainty of each entry. Both nil for a chain.
	Rotation            [][]float64 `json:"rotation,omitempty"`
	RotationUncertainty [][]float64 `json:"rotation_uncertainty,omitempty"`

	GapLabels GapLabels `json:"gap_labels"`

	// Tiles describes the tiling when the chain is made of a few tile
	// lengths; nil otherwise.
	Tiles *TileReport `json:"tiles"`

	// Disorder is the positional scatter the hull does not explain; nil
	// when no model of the hull was fitted (unresolved).
	Disorder *Disorder `json:"disorder"`
	// SiteResiduals holds, for each site, its distance in the pattern's
	// unit from the fitted model of the hull (NaN for sites left out of
	// the fit, such as spurious ones); nil when no model was fitted.
	SiteResiduals []float64 `json:"-"`

	// Trace holds the delay cloud and the circular coordinates behind the
	// result, for pictures; it is not part of the JSON form.
	Trace *Trace `json:"-"`

	Embedding   Embedding   `json:"embedding"`
	Persistence Persistence `json:"persistence"`

	// Notes say what was done to the input on the way in; Warnings what
	// the reader of the result should know before relying on it.
	Notes    []string `json:"notes"`
	Warnings []string `json:"warnings"`
}

// Hull is the classification.
type Hull struct {
	Class Class `json:"class"`
	// Betti are the Betti numbers b0, b1, b2 read off the barcodes (for
	// p × a d-torus, p·C(d, k)).
	Betti []int `json:"betti"`
	// Period is the number of sites per period (finite and point only).
	Period int `json:"period,omitempty"`
	// Components p and TorusDimension d: the hull is p disjoint copies of
	// the d-torus (point 1 × 0, finite p × 0, circle p × 1, torus p × 2,
	// torus3 p × 3); both 0 for cantor, disordered and unresolved.
	Components     int `json:"components"`
	TorusDimension int `json:"torus_dimension"`
	// Confidence is the fraction of landmark subsamples whose Betti
	// numbers agree with the ones reported (1 for classes decided by the
	// exact periodicity test).
	Confidence float64 `json:"confidence"`
	// ScaleBand is the range of scales, in whitened units, over which the
	// reported Betti numbers hold: every significant bar is alive in it.
	ScaleBand []float64 `json:"scale_band,omitempty"`
	// Reason explains the decision (always set for unresolved).
	Reason string `json:"reason"`
}

// GapLabels is the gap-label group and its small labels.
type GapLabels struct {
	// Generators of the group: 1 and the angles (or 1/p for a finite hull).
	Generators []float64 `json:"generators"`
	// MaxCoeff bounds the angle coefficients listed.
	MaxCoeff int `json:"max_coeff"`
	// Labels are the values the integrated density of states may take in
	// a spectral gap, inside (0, 1), sorted: IDS = coeffs[0] +
	// Σ coeffs[i]·Generators[i] over the generators other than 1.
	Labels []topology.Label `json:"labels"`
}

// Embedding reports the delay embedding the analysis ran on.
type Embedding struct {
	// ChosenWindow is the shortest window that unfolds the hull (the
	// window rules of package embed); Window is the one the analysis ran
	// at, longer to average noise.
	ChosenWindow  int       `json:"chosen_window"`
	Window        int       `json:"window"`
	WindowSettled bool      `json:"window_settled"`
	Spectrum      []float64 `json:"spectrum"`
	Components    int       `json:"components"`
	NoiseVariance float64   `json:"noise_variance"`
	Vectors       int       `json:"vectors"`
	Excluded      int       `json:"excluded_vectors"`
	Landmarks     int       `json:"landmarks"`
	CoverRadius   float64   `json:"cover_radius"`
}

// Persistence reports the barcodes behind the class.
type Persistence struct {
	// Threshold is the significance threshold τ on persistence, in
	// whitened units, and what it is made of: the cover radius of the
	// landmarks, the sampling gap of the trace (half the largest H0 death)
	// and the noise scale (the longest bar no hull class explains).
	Threshold   float64 `json:"threshold"`
	CoverRadius float64 `json:"cover_radius"`
	SamplingGap float64 `json:"sampling_gap"`
	NoiseScale  float64 `json:"noise_scale"`
	// Bars are the bars of dimension ≥ 1 (and H0 bars above the
	// threshold), most persistent first per dimension; Significant marks
	// those above Threshold.
	Bars []Bar `json:"bars"`
	// Subsamples holds the Betti numbers found on each landmark subsample.
	Subsamples [][]int `json:"subsamples"`
}

// Bar is one persistence bar of the landmark barcode, with whether it
// passed the significance threshold.
type Bar struct {
	rips.Bar
	Significant bool
}

// MarshalJSON writes the bar in rips.Bar's JSON form (death null for an
// essential class) with one more field, "significant".
func (b Bar) MarshalJSON() ([]byte, error) {
	j, err := json.Marshal(b.Bar)
	if err != nil {
		return nil, err
	}
	j = append(bytes.TrimSuffix(j, []byte("}")), `,"significant":`...)
	return append(strconv.AppendBool(j, b.Significant), '}'), nil
}

// UnmarshalJSON reads the form MarshalJSON writes.
func (b *Bar) UnmarshalJSON(data []byte) error {
	var sig struct {
		Significant bool `json:"significant"`
	}
	if err := json.Unmarshal(data, &sig); err != nil {
		return err
	}
	if err := b.Bar.UnmarshalJSON(data); err != nil {
		return err
	}
	b.Significant = sig.Significant
	return nil
}

// Trace is the delay cloud an analysis ran on, for pictures and reports.
type Trace struct {
	// Cloud holds the whitened delay vectors the topology worked on (the
	// first 50 000 of a long chain); Rows[i] is the index of the first
	// spacing of vector i.
	Cloud [][]float64
	Rows  []int
	// Landmarks indexes the landmark vectors of Cloud.
	Landmarks []int
	// Coordinates[k][i] is the k-th circular coordinate of vector i, in
	// turns [0, 1) (one per angle of a circle or torus; empty otherwise).
	Coordinates [][]float64
	// Bars is the full barcode of the landmarks (nil when the class was
	// decided without one).
	Bars []rips.Bar
}
