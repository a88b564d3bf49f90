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
	suffix, err := csvStart(comments, p.Unit)
	if err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	writeComments(bw, comments)
	bw.WriteString("position" + suffix + "\n")
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

// WritePlane writes p as a two-column CSV file: each comment as a line
// "# comment", then the header "x,y" (or "x_UNIT,y_UNIT" when p has a
// unit), then one site per line in the input's order, each coordinate in
// the shortest decimal form that reads back to the same float64, so that
// ReadSites gives the same plane back. Comments and unit are limited as
// for WriteCSV.
func WritePlane(w io.Writer, p *Plane, comments []string) error {
	suffix, err := csvStart(comments, p.Unit)
	if err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	writeComments(bw, comments)
	bw.WriteString("x" + suffix + ",y" + suffix + "\n")
	var buf []byte
	for _, q := range p.Points {
		buf = strconv.AppendFloat(buf[:0], q[0], 'g', -1, 64)
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, q[1], 'g', -1, 64)
		buf = append(buf, '\n')
		bw.Write(buf)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing CSV: %w", err)
	}
	return nil
}

// csvStart checks the comments and the unit of a CSV file and returns the
// header's unit suffix ("_UNIT", or "" without a unit).
func csvStart(comments []string, unit string) (string, error) {
	for i, c := range comments {
		if strings.ContainsAny(c, "\r\n") {
			return "", fmt.Errorf("writing CSV: comment %d holds a line break", i+1)
		}
	}
	if unit == "" {
		return "", nil
	}
	for _, r := range unit {
		if !unicode.IsLetter(r) && !unicode.IsDigit(r) && r != '_' && r != '/' && r != '.' {
			return "", fmt.Errorf("writing CSV: unit %q cannot be written into the header", unit)
		}
	}
	return "_" + unit, nil
}

// writeComments writes each comment as a line "# comment".
func writeComments(bw *bufio.Writer, comments []string) {
	for _, c := range comments {
		bw.WriteString("# ")
		bw.WriteString(c)
		bw.WriteByte('\n')
	}
}
