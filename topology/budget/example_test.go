package budget_test

import (
	"context"
	"fmt"
	"log"

	"phasonhull/pattern/design"
	"phasonhull/topology/budget"
	"phasonhull/topology/spectrum"
)

// The survival of the gap labelled (0, 1) of a modulated chain under a
// position error of 2% and 12% of its spacing.
func ExampleRun() {
	spec := design.NewSpec(design.Modulated)
	spec.Sites, spec.Theta, spec.Sin = 150, 0.3183, []float64{0.1}
	l, err := spectrum.ChooseLabels(context.Background(), spectrum.LabelSources{Design: &spec})
	if err != nil {
		log.Fatal(err)
	}
	chain := budget.Chain{
		Spec:    spec,
		Model:   spectrum.Model{Kind: spectrum.Hopping, Law: spectrum.Exp{T0: 1, Decay: 3}},
		Options: l.Apply(spectrum.Options{MinGap: spectrum.MinGapFor(spec.Sites)}),
	}
	r, err := budget.Run(context.Background(), chain, budget.Options{Sigmas: []float64{0.02, 0.12}, Trials: 40})
	if err != nil {
		log.Fatal(err)
	}
	for _, lv := range r.Levels {
		for _, g := range lv.Gaps {
			if g.Label.CoeffString() == "(0, 1)" {
				fmt.Printf("σ = %g: open in %d/%d, interval [%.2f, %.2f]\n", lv.Sigma, g.Open.Count, g.Open.Trials, g.Open.Low, g.Open.High)
			}
		}
	}
	// Output:
	// σ = 0.02: open in 40/40, interval [0.91, 1.00]
	// σ = 0.12: open in 19/40, interval [0.33, 0.63]
}
