// Package picture draws the figures of a hull analysis, of an audit and of
// a spectrum: projections of the delay cloud, barcodes and persistence
// diagrams, the lifted circular coordinate against site index, residuals
// along the chain, the integrated density of states, the edge-mode flow
// and the spectrum against the angle. It is presentation only: every
// number it draws was computed by the analysis packages.
//
// Every figure is drawn in one house style, Tidewater (style.go): one
// sans-serif face at sizes legible when the page is shown about 800
// pixels wide, one palette, one set of marks for homology dimensions, and
// every key (legend entries, the colour wheel of a circular coordinate)
// in a strip of its own below the panels, never over the data.
package picture
