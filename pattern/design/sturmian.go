package design

import (
	"fmt"
	"math"
	"sort"
)

// sortedLetters returns the tile letters in byte order.
func sortedLetters(tiles map[string]float64) string {
	keys := make([]string, 0, len(tiles))
	for k := range tiles {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	s := ""
	for _, k := range keys {
		s += k
	}
	return s
}

func checkSturmian(s Spec) error {
	if err := checkTurn("theta", s.Theta); err != nil {
		return err
	}
	if !(s.Intercept >= 0 && s.Intercept < 1) {
		return fmt.Errorf("intercept = %s: must lie in [0, 1)", formatFloat(s.Intercept))
	}
	if len(s.Tiles) != 2 {
		return fmt.Errorf("tiles: the sturmian family takes exactly two tile letters, got %d (%s)", len(s.Tiles), formatTiles(s.Tiles))
	}
	return checkTiles(s.Tiles, sortedLetters(s.Tiles), "sturmian")
}

// mechanicalWord returns the first n letters of the lower mechanical word
// of slope theta and intercept rho (Lothaire, Algebraic Combinatorics on
// Words, ch. 2): letter i is b when ⌊(i+1)θ+ρ⌋ − ⌊iθ+ρ⌋ = 1 and a
// otherwise, so b has frequency θ.
func mechanicalWord(theta, rho float64, n int, a, b byte) string {
	w := make([]byte, n)
	prev := math.Floor(rho)
	for i := range w {
		next := math.Floor(float64(i+1)*theta + rho)
		if next-prev == 1 {
			w[i] = b
		} else {
			w[i] = a
		}
		prev = next
	}
	return string(w)
}

func buildSturmian(s Spec) (base, error) {
	letters := sortedLetters(s.Tiles)
	word := mechanicalWord(s.Theta, s.Intercept, s.Sites-1, letters[0], letters[1])
	return base{pos: tilePositions(word, s.Tiles), word: word}, nil
}
