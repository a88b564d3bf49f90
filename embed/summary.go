package embed

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"phasonhull/pattern"
)

// Summary is what an embedding found, in the form a report prints: the
// window with each rule's figures, the component spectrum with each
// component's share of the variance, and the landmarks. Its JSON form is
// what "phasonhull embed --json" prints.
type Summary struct {
	Source      string  `json:"source"`
	Sites       int     `json:"sites"`
	Unit        string  `json:"unit"`
	MeanSpacing float64 `json:"mean_spacing"`

	Window int `json:"window"`
	// WindowRule is "chosen" or "given".
	WindowRule      string    `json:"window_rule"`
	Settled         bool      `json:"settled"`
	Cap             int       `json:"cap,omitempty"`
	Examined        int       `json:"examined_vectors,omitempty"`
	FalseNeighbours []float64 `json:"false_neighbours,omitempty"`
	NeighbourWindow int       `json:"neighbour_window,omitempty"`
	Rank            []int     `json:"rank,omitempty"`
	RankWindow      int       `json:"rank_window,omitempty"`
	NoiseVariance   float64   `json:"noise_variance,omitempty"`
	NoiseCapped     bool      `json:"noise_capped,omitempty"`

	NoiseFloor float64   `json:"noise_floor"`
	Spectrum   []float64 `json:"spectrum"`
	Variance   []float64 `json:"variance_fraction"`
	Kept       int       `json:"kept"`
	Threshold  float64   `json:"threshold"`

	Vectors     int     `json:"vectors"`
	Landmarks   int     `json:"landmarks"`
	CoverRadius float64 `json:"cover_radius"`

	// Out names the file the vectors were written to, and OutKind which
	// vectors ("whitened" or "raw"); the caller that wrote it sets them.
	Out     string `json:"out,omitempty"`
	OutKind string `json:"out_kind,omitempty"`
}

// Summary sums up the embedding of the pattern read from source.
func (r *Result) Summary(source string) *Summary {
	w := r.Whitened
	s := &Summary{
		Source: source, Sites: r.Sites, Unit: r.Unit, MeanSpacing: r.MeanSpacing,
		Window: r.Window, WindowRule: "given", Settled: true,
		NoiseFloor: r.NoiseFloor, Spectrum: w.Spectrum, Kept: w.Kept, Threshold: w.Threshold,
		Vectors: len(w.Cloud), Landmarks: len(r.Landmarks), CoverRadius: r.CoverRadius,
	}
	var total float64
	for _, v := range w.Spectrum {
		total += v
	}
	s.Variance = make([]float64, len(w.Spectrum))
	for i, v := range w.Spectrum {
		if total > 0 {
			s.Variance[i] = v / total
		}
	}
	if c := r.Choice; c != nil {
		s.WindowRule, s.Settled, s.Cap, s.Examined = "chosen", c.Settled, c.Cap, c.Vectors
		s.FalseNeighbours, s.NeighbourWindow = c.FalseNeighbours, c.NeighbourWindow
		s.Rank, s.RankWindow = c.Rank, c.RankWindow
		s.NoiseVariance, s.NoiseCapped = c.NoiseVariance, c.NoiseCapped
	}
	return s
}

// why says in words how the window was found.
func (s *Summary) why() string {
	switch {
	case s.WindowRule == "given":
		return "given (--window)"
	case s.Settled:
		dirs := "directions"
		if s.Rank[s.Cap] == 1 {
			dirs = "direction"
		}
		return fmt.Sprintf("chosen: false neighbours settle at %d, the cloud spans %d %s", s.NeighbourWindow, s.Rank[s.Cap], dirs)
	case s.RankWindow == 0:
		return "the cap: the choice did not settle — the cloud fills every direction and keeps false neighbours, as independent random spacings do"
	default:
		return fmt.Sprintf("the cap: the choice did not settle — the cloud spans %d directions but its points keep splitting as the window grows, as a Sturmian chain's do", s.Rank[s.Cap])
	}
}

// WriteText writes the summary for a reader, as "phasonhull embed" prints
// it: the pattern, the window and why, each rule's figures per window, the
// component spectrum with the kept components marked, and the landmarks.
func (s *Summary) WriteText(out io.Writer) error {
	w := bufio.NewWriter(out)
	unit := s.Unit
	if unit == "" {
		unit = "(no unit)"
	}
	fmt.Fprintf(w, "pattern     %s: %d sites, mean spacing %.6g %s\n", s.Source, s.Sites, s.MeanSpacing, unit)
	fmt.Fprintf(w, "window      %d, %s\n", s.Window, s.why())
	if s.WindowRule == "chosen" {
		var k, fnn, rank strings.Builder
		for i := range s.Rank {
			fmt.Fprintf(&k, " %5d", i+1)
			if i < len(s.FalseNeighbours) {
				fmt.Fprintf(&fnn, " %5.3f", s.FalseNeighbours[i])
			} else {
				fnn.WriteString("     -")
			}
			fmt.Fprintf(&rank, " %5d", s.Rank[i])
		}
		fmt.Fprintf(w, "  window          %s\n", k.String())
		fmt.Fprintf(w, "  false neighbours%s\n", fnn.String())
		fmt.Fprintf(w, "  components      %s\n", rank.String())
		how := "estimated"
		if s.NoiseCapped {
			how = "capped at the tolerance"
		}
		fmt.Fprintf(w, "  (%d vectors examined; noise %.3g mean spacings per spacing, %s)\n", s.Examined, math.Sqrt(max(s.NoiseVariance, 0)), how)
	}
	fmt.Fprintf(w, "components  %d of %d kept: eigenvalue above %.3g\n", s.Kept, len(s.Spectrum), s.Threshold)
	fmt.Fprintf(w, "  %3s  %11s  %8s\n", "#", "eigenvalue", "variance")
	for i, v := range s.Spectrum {
		mark := ""
		if i < s.Kept {
			mark = "  kept"
		}
		fmt.Fprintf(w, "  %3d  %11.4g  %7.2f%%%s\n", i+1, v, 100*s.Variance[i], mark)
	}
	fmt.Fprintf(w, "landmarks   %d of %d vectors, cover radius %.4g (whitened units)\n", s.Landmarks, s.Vectors, s.CoverRadius)
	if s.Out != "" {
		fmt.Fprintf(w, "written     %s: %d %s vectors\n", s.Out, s.Vectors, s.OutKind)
	}
	return w.Flush()
}

// WriteVectors writes one CSV row per delay vector of the embedding of p:
// the index of its first spacing, then its whitened components c1… or,
// raw, its dimensionless spacings d1… (d_n/d̄), after a comment line that
// says which.
func (r *Result) WriteVectors(out io.Writer, p *pattern.Pattern, raw bool) error {
	w := bufio.NewWriter(out)
	cols, name := r.Whitened.Kept, "c"
	what := fmt.Sprintf("whitened delay vectors (%d of %d components)", r.Whitened.Kept, r.Window)
	if raw {
		cols, name = r.Window, "d"
		what = "delay vectors d_n/d̄ (dimensionless)"
	}
	fmt.Fprintf(w, "# phasonhull embed: %s of %s, window %d\n", what, p.Source, r.Window)
	w.WriteString("start")
	for j := range cols {
		fmt.Fprintf(w, ",%s%d", name, j+1)
	}
	w.WriteByte('\n')
	rows := r.Whitened.Cloud
	if raw {
		x, err := Delay(p.Spacings(), r.Window)
		if err != nil {
			return err
		}
		rows = make([][]float64, len(r.Rows))
		for i, n := range r.Rows {
			rows[i] = x.RawRowView(n)
		}
	}
	buf := make([]byte, 0, 32)
	for i, row := range rows {
		w.WriteString(strconv.Itoa(r.Rows[i]))
		for _, v := range row {
			buf = strconv.AppendFloat(append(buf[:0], ','), v, 'g', -1, 64)
			w.Write(buf)
		}
		w.WriteByte('\n')
	}
	return w.Flush()
}
