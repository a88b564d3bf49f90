package pattern

import (
	"bufio"
	"fmt"
	"sort"
	"strings"
	"unicode"
	"unicode/utf8"
)

// ParseTileLengths parses tile lengths written as "A=1,B=1.618": a comma
// separated list of single ASCII letters, each with a positive finite
// length. Letters are case-sensitive and may not repeat.
func ParseTileLengths(s string) (map[string]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, fmt.Errorf("tile lengths: empty; write them as A=1,B=1.618")
	}
	m := make(map[string]float64)
	for _, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		letter, value, ok := strings.Cut(item, "=")
		letter, value = strings.TrimSpace(letter), strings.TrimSpace(value)
		if !ok || letter == "" || value == "" {
			return nil, fmt.Errorf("tile lengths %q: %q is not LETTER=LENGTH", s, item)
		}
		if len(letter) != 1 || !isASCIILetter(letter[0]) {
			return nil, fmt.Errorf("tile lengths %q: tile %q is not a single ASCII letter", s, letter)
		}
		if _, dup := m[letter]; dup {
			return nil, fmt.Errorf("tile lengths %q: tile %s is given twice", s, letter)
		}
		v, err := parseNumber(value)
		if err != nil {
			return nil, fmt.Errorf("tile lengths %q: tile %s: %w", s, letter, err)
		}
		if !(v > 0) {
			return nil, fmt.Errorf("tile lengths %q: tile %s: length %v is not positive", s, letter, v)
		}
		m[letter] = v
	}
	return m, nil
}

// readTiles reads a word of tile letters. Spaces, commas, semicolons, line
// breaks and '#' comments between letters are ignored. Errors give the
// character position on the line as the column.
func (rd *reader) readTiles(br *bufio.Reader) (*Pattern, error) {
	lr := &lineReader{rd: rd, br: br}
	var word []byte
	for {
		text, ok, err := lr.next()
		if err != nil {
			return nil, err
		}
		if !ok {
			break
		}
		col := 0
		for _, r := range stripComment(text) {
			col++
			switch {
			case unicode.IsSpace(r) || r == ',' || r == ';':
				continue
			case r >= utf8.RuneSelf && unicode.IsLetter(r):
				return nil, rd.errorf(lr.line, col, "tile letter %q is not ASCII; name tiles with the letters A-Z and a-z", r)
			case r >= utf8.RuneSelf || !isASCIILetter(byte(r)):
				return nil, rd.errorf(lr.line, col, "%q is not a tile letter", r)
			}
			if rd.opt.Tiles != nil {
				if _, known := rd.opt.Tiles[string(r)]; !known {
					return nil, rd.errorf(lr.line, col, "tile letter %q has no length (lengths are given for %s)", r, letterList(rd.opt.Tiles))
				}
			}
			if len(word) >= rd.lim.sites-1 {
				return nil, rd.errorf(lr.line, col, "more than %d sites; inputs are limited to %d", rd.lim.sites, rd.lim.sites)
			}
			word = append(word, byte(r))
		}
	}
	if len(word) == 0 {
		return nil, rd.errorf(0, 0, "has no tile letters")
	}
	if rd.opt.Tiles == nil {
		found := make(map[string]float64)
		for _, c := range word {
			found[string(c)] = 0
		}
		return nil, rd.errorf(0, 0, "is a word of tile letters (%s) but no tile lengths were given: pass --tiles A=1,B=1.618 with a length for each letter", letterList(found))
	}
	positions := make([]float64, len(word)+1)
	for i, c := range word {
		positions[i+1] = positions[i] + rd.opt.Tiles[string(c)]
	}
	p, err := rd.finish(positions, nil, "", nil)
	if err != nil {
		return nil, err
	}
	p.Word = string(word)
	return p, nil
}

// letterList lists the keys of a tile map, sorted: "A, B".
func letterList(m map[string]float64) string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return strings.Join(keys, ", ")
}
