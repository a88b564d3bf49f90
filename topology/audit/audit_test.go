package audit_test

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/audit"
	"phasonhull/topology/hull"
	"phasonhull/topology/notation"
)

// auditDir holds the shipped audit inputs: design.json (a modulated design
// of 200 sites, 450 nm apart, 40 nm first harmonic at θ = 0.381966),
// design_um.csv (the same design written in micrometres), and samples
// generated from the spec with 2 nm of position noise: sample_clean.csv and
// sample_angle.csv (built with θ = 0.39 instead); and sample_nm_nounit.csv,
// a sample of the same design in nm written without a unit (phasonhull
// generate modulated --sites 200 --spacing 450 --theta 0.381966 --sin 40
// --noise 2 --seed 11), which against design_um.csv is a unit mismatch.
const auditDir = "../../testdata/audit"

func auditPath(name string) string { return filepath.Join(auditDir, name) }

// readDesign reads a shipped design and analyses its hull.
func readDesign(t *testing.T, name string) *audit.Design {
	t.Helper()
	f, err := design.ReadFile(auditPath(name), "")
	if err != nil {
		t.Fatal(err)
	}
	return audit.NewDesign(context.Background(), f, hull.Options{})
}

// readSample reads a shipped sample.
func readSample(t *testing.T, name string) *pattern.Pattern {
	t.Helper()
	p, err := pattern.ReadFile(auditPath(name), pattern.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// run audits and fails the test on an error.
func run(t *testing.T, d *audit.Design, p *pattern.Pattern, opt audit.Options) *audit.Report {
	t.Helper()
	rep, err := audit.Run(context.Background(), d, p, opt)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// jsonOf decodes the JSON form of a report.
func jsonOf(t *testing.T, rep *audit.Report) map[string]any {
	t.Helper()
	data, err := json.Marshal(rep)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	return m
}

func length(t *testing.T, s string) pattern.Length {
	t.Helper()
	l, err := pattern.ParseLength(s)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

// A sample generated from its design with only position noise passes, with
// an identity calibration (generate adds no offset or scale) within three
// standard errors, whether the design is the spec or its positions written
// in another unit.
func TestCleanSamplePasses(t *testing.T) {
	p := readSample(t, "sample_clean.csv")
	for _, name := range []string{"design.json", "design_um.csv"} {
		rep := run(t, readDesign(t, name), p, audit.Options{})
		if !rep.Passed() || rep.Verdict != audit.Pass {
			t.Errorf("%s: verdict %v, reasons %v", name, rep.Verdict, rep.Reasons)
		}
		if len(rep.Missing)+len(rep.Extra) != 0 {
			t.Errorf("%s: missing %v extra %v", name, rep.Missing, rep.Extra)
		}
		if s, se := *rep.Scale, *rep.ScaleErr; !(se > 0) || math.Abs(s-1) > 3*se {
			t.Errorf("%s: scale %v ± %v, want 1 within 3 standard errors", name, s, se)
		}
		if o, oe := *rep.Offset, *rep.OffsetErr; !(oe > 0) || math.Abs(o) > 3*oe {
			t.Errorf("%s: offset %v ± %v, want 0 within 3 standard errors", name, o, oe)
		}
		// The robust sigma estimates the generated 2 nm of noise (the
		// MAD of 200 values is good to about 8%; 30% is over three of that).
		if s := rep.Sigma; math.Abs(s/2-1) > 0.3 {
			t.Errorf("%s: sigma %v nm, noise 2 nm", name, s)
		}
		if m := jsonOf(t, rep); m["measured_order"] != "file" || m["schema"] != audit.Schema || m["unit"] != "nm" {
			t.Errorf("%s: measured order %v, schema %v, unit %v", name, m["measured_order"], m["schema"], m["unit"])
		}
	}
}

// defects describes a sample built in closed form from the shipped design:
// x_j = offset + scale·d_j + scale·drift·(d_j − d_0)²/S + 2 nm noise, with
// the design sites in missing left out, those in displaced moved by the
// given nm, and one extra site per entry of extraAfter, 40% of the way from
// that design site to the next.
type defects struct {
	offset, scale, drift float64
	missing              []int
	displaced            map[int]float64
	extraAfter           []int
}

// build returns the sample and the measured indices of the extra sites.
func (s defects) build(t *testing.T, d *audit.Design) (*pattern.Pattern, []int) {
	t.Helper()
	dp := d.File.Pattern.Positions
	S := dp[len(dp)-1] - dp[0]
	cal := func(v float64) float64 { return s.offset + s.scale*v + s.scale*s.drift*(v-dp[0])*(v-dp[0])/S }
	rng := rand.New(rand.NewPCG(21, 0))
	var x []float64
	for j, v := range dp {
		if !slices.Contains(s.missing, j) {
			x = append(x, cal(v)+s.displaced[j]+2*rng.NormFloat64())
		}
	}
	var extras []float64
	for _, j := range s.extraAfter {
		extras = append(extras, cal(dp[j]+0.4*(dp[j+1]-dp[j])))
	}
	x = append(x, extras...)
	slices.Sort(x)
	p, err := pattern.New(x, "nm", "injected")
	if err != nil {
		t.Fatal(err)
	}
	var idx []int
	for _, e := range extras {
		idx = append(idx, slices.Index(x, e))
	}
	slices.Sort(idx)
	return p, idx
}

// Injected defects come back with exactly their indices — missing sites
// (the first design site among them), an extra site, a displaced site —
// and the calibration within three standard errors; the missing and extra
// sites fail the verdict.
func TestInjectedDefects(t *testing.T) {
	d := readDesign(t, "design.json")
	for _, c := range []struct {
		s     defects
		drift bool
	}{
		{defects{offset: 2500, scale: 1 + 3e-4}, false},
		{defects{offset: -1234.5, scale: 1 - 2e-4, drift: 5e-4}, true},
	} {
		c.s.missing, c.s.displaced, c.s.extraAfter = []int{0, 77, 78}, map[int]float64{120: 30}, []int{150}
		p, extra := c.s.build(t, d)
		rep := run(t, d, p, audit.Options{Drift: c.drift})
		if rep.Verdict != audit.Fail {
			t.Errorf("drift %g: verdict %v: want fail for missing and extra sites", c.s.drift, rep.Verdict)
		}
		if !slices.Equal(rep.Missing, c.s.missing) {
			t.Errorf("drift %g: missing %v, injected %v", c.s.drift, rep.Missing, c.s.missing)
		}
		if !slices.Equal(rep.Extra, extra) {
			t.Errorf("drift %g: extra %v, injected %v", c.s.drift, rep.Extra, extra)
		}
		if !slices.Equal(rep.Outliers, []int{120}) {
			t.Errorf("drift %g: outliers %v, displaced [120]", c.s.drift, rep.Outliers)
		}
		for _, q := range []struct {
			name      string
			v, err    *float64
			want      float64
			reportNil bool
		}{
			{"offset", rep.Offset, rep.OffsetErr, c.s.offset, false},
			{"scale", rep.Scale, rep.ScaleErr, c.s.scale, false},
			{"drift", rep.Drift, rep.DriftErr, c.s.drift, !c.drift},
		} {
			if q.reportNil {
				if _, ok := jsonOf(t, rep)["drift"]; ok || q.v != nil {
					t.Errorf("drift reported without Options.Drift")
				}
				continue
			}
			if q.v == nil || !(*q.err > 0) || math.Abs(*q.v-q.want) > 3**q.err {
				t.Errorf("drift %g: %s %v ± %v, built with %v", c.s.drift, q.name, q.v, q.err, q.want)
			}
		}
		if r := rep.Reasons; len(r) < 2 || r[0] != "3 design site(s) missing, 0 allowed" || r[1] != "1 extra measured site(s), 0 allowed" {
			t.Errorf("drift %g: reasons %v", c.s.drift, r)
		}
		if n := len(rep.Sites); n != 200-3 {
			t.Errorf("drift %g: %d sites reported, want the 197 matched", c.s.drift, n)
		}
		// The figure's marks: where the calibration puts the missing
		// sites, and the extra site where it was built.
		at := rep.MissingAt()
		dp := d.File.Pattern.Positions
		for i, j := range rep.Missing {
			want := c.s.offset + c.s.scale*dp[j] + c.s.scale*c.s.drift*(dp[j]-dp[0])*(dp[j]-dp[0])/(dp[len(dp)-1]-dp[0])
			if math.Abs(at[i]-want) > 10 {
				t.Errorf("drift %g: missing design #%d expected at %v, built at %v", c.s.drift, j, at[i], want)
			}
		}
		if ex := rep.ExtraAt(); len(ex) != 1 || ex[0] != p.Positions[extra[0]] {
			t.Errorf("drift %g: extra at %v", c.s.drift, ex)
		}
	}
}

// The verdict follows the limits: two missing sites fail by default and
// pass when allowed; a displaced site is an outlier that decides nothing
// until a tolerance below its displacement is given.
func TestLimits(t *testing.T) {
	d := readDesign(t, "design.json")
	p, _ := defects{offset: 700, scale: 1 + 1e-4, missing: []int{40, 130}, displaced: map[int]float64{90: 30}}.build(t, d)
	rep := run(t, d, p, audit.Options{})
	if rep.Verdict != audit.Fail || len(rep.Reasons) != 1 {
		t.Errorf("two missing, none allowed: verdict %v, reasons %v", rep.Verdict, rep.Reasons)
	}
	rep = run(t, d, p, audit.Options{AllowMissing: 2})
	if rep.Verdict != audit.Pass || !slices.Equal(rep.Outliers, []int{90}) {
		t.Errorf("two missing allowed: verdict %v, reasons %v, outliers %v", rep.Verdict, rep.Reasons, rep.Outliers)
	}
	rep = run(t, d, p, audit.Options{AllowMissing: 2, Tolerance: length(t, "0.02um")})
	if rep.Verdict != audit.Fail || len(rep.Reasons) != 1 || !strings.Contains(rep.Reasons[0], "1 matched site(s) beyond the tolerance of 20 nm") {
		t.Errorf("tolerance 20 nm: verdict %v, reasons %v", rep.Verdict, rep.Reasons)
	}
	if rep.Tolerance == nil || math.Abs(*rep.Tolerance-20) > 1e-12 {
		t.Errorf("tolerance 0.02um read as %v nm", rep.Tolerance)
	}
	var beyond []int
	for _, s := range rep.Sites {
		if s.WithinTolerance != nil && !*s.WithinTolerance {
			beyond = append(beyond, *s.Design)
		}
	}
	if !slices.Equal(beyond, []int{90}) {
		t.Errorf("sites beyond the tolerance %v, want [90]", beyond)
	}
}

// The text report names the defects by index and ends with the verdict.
func TestWriteText(t *testing.T) {
	d := readDesign(t, "design.json")
	p, extra := defects{offset: 2500, scale: 1 + 3e-4, missing: []int{0, 77, 78}, displaced: map[int]float64{120: 30}, extraAfter: []int{150}}.build(t, d)
	var b bytes.Buffer
	rep := run(t, d, p, audit.Options{})
	if err := rep.WriteText(&b); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	// The calibration and the angles to the digits their uncertainties justify.
	calib := "calibration offset " + notation.PlusMinus(*rep.Offset, *rep.OffsetErr) + " nm, scale " + notation.PlusMinus(*rep.Scale, *rep.ScaleErr) + " ("
	theta := "sample: " + string(rep.Hull.Measured.Hull.Class) + ", θ = " + notation.PlusMinus(rep.Hull.Measured.Angles[0], rep.Hull.Measured.AngleUncertainty[0]) + ","
	for _, want := range []string{"design #0 ", "design #77 ", "design #78 ", "measured #" + strconv.Itoa(extra[0]) + " ",
		"design #120 (measured #", calib, theta, "verdict     FAIL: 3 design site(s) missing, 0 allowed; 1 extra measured site(s), 0 allowed\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
	if !strings.HasSuffix(out, "0 allowed\n") {
		t.Errorf("text report does not end with the verdict:\n%s", out)
	}
}

// A sample built with another angle fails the hull verdict, even with
// every registration defect allowed.
func TestOtherAngleFails(t *testing.T) {
	rep := run(t, readDesign(t, "design.json"), readSample(t, "sample_angle.csv"), audit.Options{AllowMissing: 50, AllowExtra: 50})
	if rep.Verdict != audit.Fail {
		t.Fatalf("verdict %v", rep.Verdict)
	}
	if len(rep.Reasons) != 1 || !strings.HasPrefix(rep.Reasons[0], "hull: ") {
		t.Errorf("reasons %v: want the hull verdict alone", rep.Reasons)
	}
	// Every site is present: the registration must not slip by one site
	// (design #0 missing, the last measured site extra).
	if len(rep.Missing) != 0 || len(rep.Extra) != 0 || rep.Matched != 200 {
		t.Errorf("missing %v extra %v, %d matched; every site is present", rep.Missing, rep.Extra, rep.Matched)
	}
	cmp := rep.Hull.Comparison
	if cmp == nil || cmp.Agree || len(cmp.Angles) != 2 {
		t.Fatalf("comparison %+v", cmp)
	}
	// The sample was generated with θ = 0.39: it is about 0.008 from the
	// spec's 0.381966.
	if ref := cmp.Angles[1]; ref.Against != "reference" || math.Abs(ref.Difference-0.008034) > 1e-4 {
		t.Errorf("reference check %+v", ref)
	}
}

// Without a design the sites are screened against the sample's own hull:
// a clean sample passes; a displaced site is flagged, and fails once a
// tolerance below its displacement is given.
func TestWithoutDesign(t *testing.T) {
	p := readSample(t, "sample_clean.csv")
	rep := run(t, nil, p, audit.Options{})
	if rep.Verdict != audit.Pass || len(rep.Outliers) != 0 {
		t.Errorf("clean sample alone: verdict %v, outliers %v, reasons %v", rep.Verdict, rep.Outliers, rep.Reasons)
	}
	if _, ok := jsonOf(t, rep)["scale"]; ok || rep.Scale != nil {
		t.Error("scale reported without a design")
	}
	p.Positions[90] += 40 // 20 sigma of the 2 nm noise, a tenth of a spacing
	rep = run(t, nil, p, audit.Options{})
	if rep.Verdict != audit.Pass || !slices.Contains(rep.Outliers, 90) {
		t.Errorf("displaced site 90: verdict %v, outliers %v", rep.Verdict, rep.Outliers)
	}
	rep = run(t, nil, p, audit.Options{Tolerance: length(t, "25nm")})
	if rep.Verdict != audit.Fail || !slices.Contains(rep.Outliers, 90) {
		t.Errorf("displaced site 90, tolerance 25 nm: verdict %v, outliers %v, reasons %v", rep.Verdict, rep.Outliers, rep.Reasons)
	}
	if len(rep.Reasons) != 1 || !strings.Contains(rep.Reasons[0], "beyond the tolerance of 25 nm from the sample's own hull model") {
		t.Errorf("reasons %v", rep.Reasons)
	}
}

// Options no audit can use, and a tolerance that cannot be put in the
// sample's unit, are errors, not verdicts.
func TestRunRefuses(t *testing.T) {
	p := readSample(t, "sample_clean.csv")
	noUnit, err := pattern.New(p.Positions, "", "no unit")
	if err != nil {
		t.Fatal(err)
	}
	for name, c := range map[string]struct {
		p   *pattern.Pattern
		opt audit.Options
	}{
		"gate":              {p, audit.Options{Gate: 1.5}},
		"allow":             {p, audit.Options{AllowMissing: -1}},
		"tolerance":         {p, audit.Options{Tolerance: pattern.Length{Value: math.NaN()}}},
		"tolerance unit":    {p, audit.Options{Tolerance: length(t, "0.02deg")}},
		"tolerance no unit": {noUnit, audit.Options{Tolerance: length(t, "3nm")}},
	} {
		if rep, err := audit.Run(context.Background(), nil, c.p, c.opt); err == nil {
			t.Errorf("%s: no error, verdict %v", name, rep.Verdict)
		}
	}
}

// A design in um against a sample written in nm without a unit: the
// sample is taken to be in um, the registration fits a scale of 1000, and
// the audit fails on it, naming the units and the flag; with the sample's
// unit given it passes. A scale near no unit ratio fails without a hint,
// and one within the allowed error passes.
func TestScaleRule(t *testing.T) {
	d := readDesign(t, "design_um.csv")
	p := readSample(t, "sample_nm_nounit.csv")
	rep := run(t, d, p, audit.Options{})
	if rep.Verdict != audit.Fail || len(rep.Reasons) != 1 {
		t.Fatalf("verdict %v, reasons %v", rep.Verdict, rep.Reasons)
	}
	for _, want := range []string{"1000×", "in nm against a design in um", "--unit nm", "--max-scale-error"} {
		if !strings.Contains(rep.Reasons[0], want) {
			t.Errorf("reason %q lacks %q", rep.Reasons[0], want)
		}
	}
	if m := jsonOf(t, rep); m["max_scale_error"] != audit.DefaultMaxScaleError {
		t.Errorf("max_scale_error %v", m["max_scale_error"])
	}
	withUnit, err := pattern.ReadFile(auditPath("sample_nm_nounit.csv"), pattern.ReadOptions{Unit: "nm"})
	if err != nil {
		t.Fatal(err)
	}
	if rep := run(t, d, withUnit, audit.Options{}); rep.Verdict != audit.Pass {
		t.Errorf("with the unit nm: verdict %v, reasons %v", rep.Verdict, rep.Reasons)
	}
	// The design in nm, the sample scaled by 400 or 1.01.
	dn := readDesign(t, "design.json")
	for _, c := range []struct {
		scale   float64
		maxErr  float64
		fails   bool
		mention string
	}{
		{400, 0, true, "outside 1 ± 0.02"},
		{1.01, 0, false, ""},
		{1.01, 0.005, true, "outside 1 ± 0.005"},
		{1e6, 0, true, "10^6×"},
		{1 / 25.4, 0, true, "inches"},
		{400, math.Inf(1), false, ""},
	} {
		x := slices.Clone(p.Positions)
		for i := range x {
			x[i] *= c.scale
		}
		q, err := pattern.New(x, "nm", "scaled")
		if err != nil {
			t.Fatal(err)
		}
		rep := run(t, dn, q, audit.Options{MaxScaleError: c.maxErr})
		failed := slices.ContainsFunc(rep.Reasons, func(r string) bool { return strings.Contains(r, "registration scale") })
		if failed != c.fails || (c.fails && !strings.Contains(rep.Reasons[0], c.mention)) {
			t.Errorf("scale %v, max error %v: reasons %v", c.scale, c.maxErr, rep.Reasons)
		}
		if c.scale == 400 && c.fails && strings.Contains(rep.Reasons[0], "looks") {
			t.Errorf("scale 400 named as a unit ratio: %v", rep.Reasons[0])
		}
	}
}
