package batch

import (
	"encoding/csv"
	"io"
	"strconv"
	"strings"
)

// Columns are the columns of the CSV form, one per field of Row.
var Columns = []string{"file", "sites", "unit", "class", "period", "angles", "uncertainty", "disorder", "disorder_relative",
	"verdict", "missing", "extra", "rms", "max", "offset", "scale", "reasons", "error"}

// WriteCSV writes the summary as a table with a header row of Columns and
// a row per file: lists ";"-separated (reasons "; "), numbers in full
// precision, empty cells for what a row does not have.
func (s *Summary) WriteCSV(file io.Writer) error {
	w := csv.NewWriter(file)
	w.Write(Columns)
	num := func(v *float64) string {
		if v == nil {
			return ""
		}
		return strconv.FormatFloat(*v, 'g', -1, 64)
	}
	count := func(v *int) string {
		if v == nil {
			return ""
		}
		return strconv.Itoa(*v)
	}
	list := func(v []float64) string {
		s := make([]string, len(v))
		for i, x := range v {
			s[i] = strconv.FormatFloat(x, 'g', -1, 64)
		}
		return strings.Join(s, ";")
	}
	for _, r := range s.Rows {
		sites, period := "", ""
		if r.Sites > 0 {
			sites = strconv.Itoa(r.Sites)
		}
		if r.Period > 0 {
			period = strconv.Itoa(r.Period)
		}
		w.Write([]string{r.File, sites, r.Unit, r.Class, period, list(r.Angles), list(r.Uncertainty),
			num(r.Disorder), num(r.DisorderRelative), r.Verdict, count(r.Missing), count(r.Extra),
			num(r.RMS), num(r.Max), num(r.Offset), num(r.Scale), strings.Join(r.Reasons, "; "), r.Error})
	}
	w.Flush()
	return w.Error()
}
