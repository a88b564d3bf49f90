package design

import (
	"fmt"
	"sort"
	"strings"
)

// builtinRules are the substitution rules known by name.
func builtinRule(name string) (string, bool) {
	switch name {
	case "fibonacci":
		return "A=AB,B=A", true
	case "thue-morse":
		return "A=AB,B=BA", true
	case "period-doubling":
		return "A=AB,B=AA", true
	}
	return "", false
}

// rule is a parsed substitution: each letter's image, the letter the
// iteration starts from (the first one defined) and the sorted alphabet.
type rule struct {
	image    map[byte]string
	first    byte
	alphabet string
}

// parseRule parses a rule name or a rule written "A=AB,B=A": ASCII
// letters, each defined once, every image non-empty and made of defined
// letters.
func parseRule(text string) (rule, error) {
	if text == "" {
		return rule{}, fmt.Errorf("rule: missing; give fibonacci, thue-morse, period-doubling or a rule like A=AB,B=A")
	}
	src := text
	if r, ok := builtinRule(text); ok {
		src = r
	} else if !strings.Contains(text, "=") {
		return rule{}, fmt.Errorf("rule %q: unknown; give fibonacci, thue-morse, period-doubling or a rule like A=AB,B=A", text)
	}
	r := rule{image: map[byte]string{}}
	for i, part := range strings.Split(src, ",") {
		letter, img, ok := strings.Cut(strings.TrimSpace(part), "=")
		if !ok || len(letter) != 1 || !tileLetter(letter[0]) {
			return rule{}, fmt.Errorf("rule %q: part %d (%q) is not LETTER=WORD with LETTER one ASCII letter", text, i+1, part)
		}
		if img == "" {
			return rule{}, fmt.Errorf("rule %q: letter %s maps to the empty word", text, letter)
		}
		if _, dup := r.image[letter[0]]; dup {
			return rule{}, fmt.Errorf("rule %q: letter %s is defined twice", text, letter)
		}
		if i == 0 {
			r.first = letter[0]
		}
		r.image[letter[0]] = img
	}
	letters := make([]string, 0, len(r.image))
	for l, img := range r.image {
		letters = append(letters, string(l))
		for j := range len(img) {
			if _, ok := r.image[img[j]]; !ok {
				return rule{}, fmt.Errorf("rule %q: the image of %c uses letter %q, which the rule does not define", text, l, img[j])
			}
		}
	}
	sort.Strings(letters)
	r.alphabet = strings.Join(letters, "")
	return r, nil
}

// word returns the first n letters of σ^k(first) for k large enough. Only
// the first n letters of each iterate are kept: the first n letters of
// σ(w) depend only on the first n letters of w.
//
// Images are non-empty, so the length never shrinks; when it has stayed
// the same for as many steps as there are letters, every site's letter
// runs through a cycle of one-letter images and the word never grows
// again: the rule is refused. Rules that grow too slowly to reach n
// letters in a bounded amount of work are refused too.
func (r rule) word(n int) (string, error) {
	w := []byte{r.first}
	flat, work := 0, 0
	for len(w) < n {
		next := make([]byte, 0, n)
		for _, c := range w {
			next = append(next, r.image[c]...)
			if len(next) >= n {
				break
			}
		}
		if len(next) == len(w) {
			flat++
			if flat >= len(r.alphabet) {
				return "", fmt.Errorf("rule %s does not grow: from %c its words stop at %d letters, fewer than the %d needed", r.text(), r.first, len(w), n)
			}
		} else {
			flat = 0
		}
		work += len(next)
		if work > 64*n+(1<<20) {
			return "", fmt.Errorf("rule %s grows too slowly: %d letters after many iterations, %d needed", r.text(), len(next), n)
		}
		w = next
	}
	return string(w[:n]), nil
}

// text writes the rule back as LETTER=WORD pairs, first letter first.
func (r rule) text() string {
	parts := []string{fmt.Sprintf("%c=%s", r.first, r.image[r.first])}
	for i := range len(r.alphabet) {
		if c := r.alphabet[i]; c != r.first {
			parts = append(parts, fmt.Sprintf("%c=%s", c, r.image[c]))
		}
	}
	return strings.Join(parts, ",")
}

func checkSubstitution(s Spec) error {
	r, err := parseRule(s.Rule)
	if err != nil {
		return err
	}
	if len(s.Tiles) == 0 {
		return fmt.Errorf("tiles: missing; the rule's letters %s need lengths, e.g. tiles = %s", r.alphabet, exampleTiles(r.alphabet))
	}
	return checkTiles(s.Tiles, r.alphabet, "substitution")
}

func buildSubstitution(s Spec) (base, error) {
	r, err := parseRule(s.Rule)
	if err != nil {
		return base{}, err
	}
	word, err := r.word(s.Sites - 1)
	if err != nil {
		return base{}, err
	}
	return base{pos: tilePositions(word, s.Tiles), word: word}, nil
}
