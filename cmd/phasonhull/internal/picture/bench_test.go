package picture

import "testing"

// BenchmarkDemoFigures draws and encodes every figure of the demo sample
// as PNG (the analysis itself is outside the timing).
func BenchmarkDemoFigures(b *testing.B) {
	r := demoResults(b)[0]
	for b.Loop() {
		pics, err := Analysis(r)
		if err != nil {
			b.Fatal(err)
		}
		for _, p := range pics {
			if _, err := p.Bytes(PNG); err != nil {
				b.Fatal(err)
			}
		}
	}
}
