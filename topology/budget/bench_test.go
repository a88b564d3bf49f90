package budget

import (
	"context"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology/spectrum"
)

// BenchmarkRun500 is the speed goal of the budget: 200 trials of a
// 500-site design at 5 error levels, gaps only (the hull analysis and the
// phase sweep, measured on a subset of trials, cost far more each). It
// reports the CPU time per run beside the wall time: on a shared machine
// the wall time follows the load, and on an idle one it is about the CPU
// time over the number of cores.
func BenchmarkRun500(b *testing.B) {
	spec := design.NewSpec(design.Modulated)
	spec.Sites, spec.Theta, spec.Sin = 500, 0.3183, []float64{0.08}
	l, err := spectrum.ChooseLabels(context.Background(), spectrum.LabelSources{Design: &spec})
	if err != nil {
		b.Fatal(err)
	}
	c := Chain{Spec: spec, Model: spectrum.Model{Kind: spectrum.Hopping, Law: spectrum.Exp{T0: 1, Decay: 3}},
		Options: l.Apply(spectrum.Options{MinGap: spectrum.MinGapFor(spec.Sites)})}
	opt := Options{Sigmas: []float64{0, 0.01, 0.02, 0.05, 0.1}, Trials: 200}
	start := cpuSeconds()
	for b.Loop() {
		if _, err := Run(context.Background(), c, opt); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric((cpuSeconds()-start)/float64(b.N), "cpu-s/op")
}
