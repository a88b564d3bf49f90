package main

import (
	"encoding/json"
	"os"
	"regexp"
	"strings"
	"testing"

	"phasonhull/topology/budget"
)

// The JSON form has the documented schema and one row per gap and level,
// and a target gap the design does not open is refused (exit 2) with the
// gaps it does open.
func TestBudgetCommand(t *testing.T) {
	args := []string{"budget", "--design", "../../testdata/spectrum/modulated.json", "--hopping", "exp", "--decay", "3",
		"--sigma", "0:0.02:3", "--trials", "12", "--hull-trials", "2", "--edge-trials", "0", "--json"}
	code, out, stderr := runCmd(args...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var r budget.Result
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if r.Schema != budget.Schema || r.Trials != 12 || r.HullTrials != 2 || len(r.Levels) != 3 || len(r.Design.Gaps) == 0 {
		t.Fatalf("result %+v", r)
	}
	for _, l := range r.Levels {
		if len(l.Gaps) != len(r.Design.Gaps) || l.Hull == nil || l.Hull.Kept.Trials != 2 {
			t.Errorf("level σ = %g: %d gaps for %d, hull %+v", l.Sigma, len(l.Gaps), len(r.Design.Gaps), l.Hull)
		}
	}
	if r.Levels[1].Sigma != 0.01 {
		t.Errorf("--sigma 0:0.02:3 gave the levels %g, %g, %g", r.Levels[0].Sigma, r.Levels[1].Sigma, r.Levels[2].Sigma)
	}
	code, _, stderr = runCmd(append(args[:len(args)-1], "--gap", "7,-9")...)
	if code != exitInput || !strings.Contains(stderr, "does not open the gap (7, -9)") || !strings.Contains(stderr, "it opens (") {
		t.Errorf("exit %d, %s: want a refusal naming the open gaps", code, stderr)
	}
}

// The README's reading of the budget repeats the figures its quoted output
// shows (which TestReadmeQuotesOutput keeps true): the budget σ, the
// bracket of its Monte Carlo error and the survival at 0.3 mm.
func TestReadmeBudgetReading(t *testing.T) {
	b, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(b)
	q := regexp.MustCompile(`stays open with probability ≥ 0.95 up to σ = ([0-9.]+) mm\n +Monte Carlo error: between σ = ([0-9.]+) mm and ([0-9.]+) mm`).FindStringSubmatch(readme)
	row := regexp.MustCompile(`0\.3 mm +0 +0 +\(0, 1\) +([0-9]+)/200`).FindStringSubmatch(readme)
	if q == nil || row == nil {
		t.Fatal("the README quotes no budget")
	}
	for _, want := range []string{"The budget is σ ≈ " + q[1] + " mm", "the bracket [" + q[2] + ", " + q[3] + "] mm", "below " + q[2] + " mm", "above " + q[3] + " mm", "open in only " + row[1] + " of 200"} {
		if !strings.Contains(readme, want) {
			t.Errorf("the README's reading of the budget lacks %q", want)
		}
	}
}
