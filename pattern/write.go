package pattern

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode"
)

// WriteCSV writes p as a one-column CSV file: each comment as a line
// "# comment", then the header "position" (or "position_UNIT" when p has a
// unit), then one position per line in the shortest decimal form that
// reads back to the same float64, so a written file round-trips exactly.
//
// Comments must be single lines, and the unit may hold only letters,
// digits, '_', '/' and '.', so that the header reads back as one field.
func WriteCSV(w io.Writer, p *Pattern, comments []string) error {
	for i, c := range comments {
		if strings.ContainsAny(c, "\r\n") {
			return fmt.Errorf("writing CSV: comment %d holds a line break", i+1)
		}
	}
	header := "position"
	if p.Unit != "" {
		for _, r := range p.Unit {
			if !unicode.IsLetter(r) && !unicode.IsDigit(r) && r != '_' && r != '/' && r != '.' {
				return fmt.Errorf("writing CSV: unit %q cannot be written into the header", p.Unit)
			}
		}
		header += "_" + p.Unit
	}
	bw := bufio.NewWriter(w)
	for _, c := range comments {
		bw.WriteString("# ")
		bw.WriteString(c)
		bw.WriteByte('\n')
	}
	bw.WriteString(header)
	bw.WriteByte('\n')
	var buf []byte
	for _, x := range p.Positions {
		buf = strconv.AppendFloat(buf[:0], x, 'g', -1, 64)
		buf = append(buf, '\n')
		bw.Write(buf)
	}
	// bufio.Writer keeps the first write error and returns it here.
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing CSV: %w", err)
	}
	return nil
}
