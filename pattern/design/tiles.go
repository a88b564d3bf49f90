package design

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// tileLetter reports whether c may name a tile: an ASCII letter, the
// letters a tile-word file is read with.
func tileLetter(c byte) bool { return 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z' }

// checkTiles checks that tiles gives a positive length to exactly the
// letters of alphabet, and no others.
func checkTiles(tiles map[string]float64, alphabet, family string) error {
	keys := make([]string, 0, len(tiles))
	for k := range tiles {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if len(k) != 1 || !tileLetter(k[0]) {
			return fmt.Errorf("tiles: letter %q: a tile letter is one ASCII letter", k)
		}
		if !strings.Contains(alphabet, k) {
			return fmt.Errorf("tiles: letter %q does not occur in the %s design (its letters are %s)", k, family, alphabet)
		}
		if v := tiles[k]; !(v > 0) {
			return fmt.Errorf("tiles: length of %q = %s: tile lengths must be positive", k, formatFloat(v))
		}
	}
	for i := range len(alphabet) {
		if _, ok := tiles[alphabet[i:i+1]]; !ok {
			return fmt.Errorf("tiles: no length for letter %q (give tiles like %s)", alphabet[i:i+1], exampleTiles(alphabet))
		}
	}
	return nil
}

func exampleTiles(alphabet string) string {
	parts := make([]string, len(alphabet))
	for i := range len(alphabet) {
		parts[i] = fmt.Sprintf("%c=%d", alphabet[i], i+1)
	}
	return strings.Join(parts, ",")
}

// tilePositions places the sites of a tile word: site n sits at
// Σ_letters count_n(letter)·length(letter), count_n(letter) the number of
// times the letter occurs among the first n tiles, so rounding does not
// accumulate along the chain.
func tilePositions(word string, tiles map[string]float64) []float64 {
	var length [128]float64
	var count [128]float64
	var letters []byte
	for k, v := range tiles {
		length[k[0]] = v
		letters = append(letters, k[0])
	}
	sort.Slice(letters, func(i, j int) bool { return letters[i] < letters[j] })
	pos := make([]float64, len(word)+1)
	for n := range len(word) {
		count[word[n]]++
		x := 0.0
		for _, l := range letters {
			x = math.FMA(count[l], length[l], x)
		}
		pos[n+1] = x
	}
	return pos
}
