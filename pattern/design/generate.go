package design

import (
	"fmt"
	"strings"

	"phasonhull/pattern"
)

// Generate builds the pattern a valid spec describes: the family's design,
// then the perturbations in the documented order. The pattern's Source is
// "generated", its Unit the spec's, its Word the tile word of the tile
// families (while it still matches the sites), and its Notes describe the
// family, every parameter and every perturbation.
func Generate(spec Spec) (*pattern.Pattern, error) {
	c, b, err := spec.prepare()
	if err != nil {
		return nil, fmt.Errorf("design: %w", err)
	}
	if c.Family.Dimension() == 2 {
		return nil, fmt.Errorf("design: the %s family makes plates (two-dimensional): generate it with GeneratePlane", c.Family)
	}
	pos, word, notes := perturb(c, b)
	p, err := pattern.New(pos, c.Unit, "generated")
	if err != nil {
		return nil, fmt.Errorf("design %s: %w", c.Family, err)
	}
	p.Word = word
	fam, _ := lookupFamily(c.Family)
	head := c.generatedNote(fam.formula)
	p.Notes = append(append([]string{head}, notes...), p.Notes...)
	return p, nil
}

// generatedNote is the first note of a generated pattern or plane: the
// family, its formula and every parameter of the spec.
func (s Spec) generatedNote(formula string) string {
	var params []string
	for _, line := range s.Comments() {
		if !strings.HasPrefix(line, "spec: ") && !strings.HasPrefix(line, "family = ") {
			params = append(params, line)
		}
	}
	return fmt.Sprintf("generated from the %s family, %s, with %s", s.Family, formula, strings.Join(params, ", "))
}
