package tones

import (
	"fmt"
	"testing"
)

func TestDebugJunk(t *testing.T) {
	s := chain{n: 5000, angles: []float64{golden, silver, bronze}, amps: []float64{0.1, 0.08, 0.06}, seed: 3}.spacings()
	m := newModel(s, 1)
	sp := newSpectrum(len(s), 1e-3)
	for look := 0; look < 4; look++ {
		pow := sp.periodogram(m.resid)
		fl := sp.fitFloor(pow, m.freqs())
		c := sp.candidates(pow, fl, m.freqs(), 8)
		fmt.Println("look", look, fl.c, c)
		for _, f0 := range c {
			k := int(f0*float64(sp.nfft) + 0.5)
			ok := m.add(f0, fl.at(f0), 1e-3, func(l sinusoid) bool {
				fmt.Println("  fit", l, l.amp(), sp.significant(l.f, l.amp(), fl), pow[k], fl.at(f0))
				return sp.significant(l.f, l.amp(), fl)
			})
			_ = ok
		}
	}
}
