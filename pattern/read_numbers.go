package pattern

import "io"

// The readers in this file take the numeric inputs that go with a pattern
// rather than the pattern itself: a point cloud, a coupling table, a list
// of values. They accept text as Read does (UTF-8 with or without a
// byte-order mark, LF or CRLF, '#' comments, blank lines, fields separated
// by semicolons, commas, tabs or spaces, plain decimal numbers) and refuse
// bad input with an *InputError naming the file, the line and the field.
// The name "-" means standard input and shows as "<stdin>" in messages.

// ReadPoints reads a point cloud: one point a row, every row with as many
// coordinates as the first. There is no header row: a cloud is numbers
// only, so that a column of indices or names is not read as a coordinate.
// The points share one backing array.
func ReadPoints(r io.Reader, name string) ([][]float64, error) {
	rd, br, _, err := openText(r, name, defaultLimits())
	if err != nil {
		return nil, err
	}
	t, err := rd.readTable(br, tableRules{noun: "points"})
	if err != nil {
		return nil, err
	}
	pts := make([][]float64, t.rows())
	for i := range pts {
		pts[i] = t.vals[i*t.cols : (i+1)*t.cols : (i+1)*t.cols]
	}
	return pts, nil
}

// ReadCouplings reads a coupling table: rows of a distance and a coupling,
// after an optional header row of names. Distances must be positive and
// strictly ascending; at least two rows are needed.
func ReadCouplings(r io.Reader, name string) (distances, couplings []float64, err error) {
	rd, br, _, err := openText(r, name, defaultLimits())
	if err != nil {
		return nil, nil, err
	}
	t, err := rd.readTable(br, tableRules{
		columns: func(n, line int) error {
			if n != 2 {
				return rd.errorf(line, 0, "has %d columns; a coupling table has 2 (distance, coupling)", n)
			}
			return nil
		},
		header: true,
		noun:   "rows",
	})
	if err != nil {
		return nil, nil, err
	}
	n := t.rows()
	if n < 2 {
		return nil, nil, rd.errorf(t.lines[0], 0, "a coupling table needs at least two rows, this one has 1")
	}
	distances, couplings = make([]float64, n), make([]float64, n)
	for i := range n {
		d := t.vals[2*i]
		switch {
		case !(d > 0):
			return nil, nil, rd.errorf(t.lines[i], 1, "distance %v is not positive", d)
		case i > 0 && d <= distances[i-1]:
			return nil, nil, rd.errorf(t.lines[i], 1, "distance %v does not exceed %v on line %d; distances must ascend", d, distances[i-1], t.lines[i-1])
		}
		distances[i], couplings[i] = d, t.vals[2*i+1]
	}
	return distances, couplings, nil
}

// ReadValues reads one value a line — measured levels, per-site terms —
// from the first field of each line; further fields (a quality factor, an
// index) are ignored. A first line of names is a header. At least two
// values are needed.
func ReadValues(r io.Reader, name string) ([]float64, error) {
	rd, br, _, err := openText(r, name, defaultLimits())
	if err != nil {
		return nil, err
	}
	var v []float64
	first := true
	err = rd.dataLines(br, func(line int, fields []string) error {
		if first {
			first = false
			if isHeader(joinUnits(fields)) {
				return nil
			}
		}
		if len(v) >= rd.lim.sites {
			return rd.errorf(line, 0, "more than %d values; inputs are limited to %d", rd.lim.sites, rd.lim.sites)
		}
		x, err := rd.number(fields[0], line)
		if err != nil {
			return rd.wrap(line, 1, err)
		}
		v = append(v, x)
		return nil
	})
	if err != nil {
		return nil, err
	}
	if len(v) < 2 {
		return nil, rd.errorf(0, 0, "has %d value(s); at least two are needed", len(v))
	}
	return v, nil
}
