// Package audit checks a fabricated sample against its design before it is
// used: is its hull the intended one, with the intended angle, which sites
// are missing, extra or out of tolerance, and is what deviates calibration
// (offset, scale, drift) or real defects?
//
// Run registers the sample on a Design (pattern/register) and compares the
// hull analyses of both (topology/hull); without a design it screens the
// sites against the sample's own hull model. Its Report is the whole
// result, with the verdict and its reasons; its JSON form is the schema
// phasonhull.audit/1 (Schema) and WriteText writes it for a reader.
//
// # Verdict
//
// A sample passes when none of these rules gives a reason to fail it; the
// reasons are listed in this order (rules in rules.go):
//
//  1. sample hull: the sample's hull can be analysed;
//  2. hull model (no design): the sample's hull has a model to screen the
//     sites against (a circle or torus, say, but not an unresolved hull);
//  3. screening (no design): the model leaves some site to screen;
//  4. registration (design): the sample can be registered on the design;
//  5. scale (design): the magnitude of the registration scale is within
//     1 ± Options.MaxScaleError (default 2%); a scale near a ratio of
//     length units (10^±k, 25.4, 2.54 and their inverses, within the
//     allowed error plus three standard errors) is named as a unit
//     mismatch, with the units it suggests and the flag that fixes it —
//     a design or sample without a unit is taken to be in the other's
//     unit, and this rule catches the case where it is not;
//  6. missing (design): no more design sites are missing than
//     Options.AllowMissing;
//  7. extra: no more measured sites are extra (left out of the hull model,
//     without a design) than Options.AllowExtra;
//  8. tolerance: every matched (or screened) site is within
//     Options.Tolerance of where the design (or the model) puts it, when a
//     tolerance is given;
//  9. design hull (design): the design's hull can be analysed;
//  10. hull agreement (design): the hulls agree (hull.CompareWith): same
//     class and period, and angles within their combined uncertainties.
//
// When the registration finds other alignments of the sample that tie
// with the one it reports (a lattice cannot tell which end a missing site
// was at, say), the report lists them (Report.Alignment) and says so in a
// note; they decide nothing.
//
// Robust outliers (beyond register.OutlierFactor robust sigmas) are
// reported but decide nothing unless a tolerance is given.
//
// # Plates
//
// RunPlane audits a plate against a plate design by the same rules: the
// registration is a similarity (register.RegisterPlane), residuals are
// vectors whose lengths meet the tolerance and the outlier cut, merged and
// swapped sites are not looked for, and the hull agreement compares the
// rotation matrices as modules (any integer change of lattice basis or
// torus coordinates is the same hull). Sites dispatches on the dimension
// and refuses a design and a sample of different dimensions.
//
// # Indices
//
// Indices are 0-based: design indices count design sites in ascending
// position; measured indices count the data rows of the sample's file in
// the order the file lists them (pattern.Pattern.Rows), whatever the scan
// order, so that a flagged site can be found in the file.
package audit
