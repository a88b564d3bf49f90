package outfile

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// An output is refused when it is an input under any name: the same name,
// another spelling, a symlink or a hard link; and an output folder is
// refused when it holds an input at any depth.
func TestCheckByIdentity(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	os.Mkdir("data", 0o755)
	in := filepath.Join("data", "in.csv")
	os.WriteFile(in, []byte("1\n2\n"), 0o644)
	os.Symlink(filepath.Join(dir, in), "link.csv")
	os.Link(in, "hard.csv")
	os.Symlink(filepath.Join(dir, "data"), "datalink")
	inputs := []Path{{Source: "--design", Name: in}}
	for _, c := range []struct {
		out  Path
		want string // "" for accepted
	}{
		{Path{Source: "--out", Name: in}, "is the input --design"},
		{Path{Source: "--out", Name: "./data/../data/in.csv"}, "is the input --design"},
		{Path{Source: "--out", Name: "link.csv"}, "is the input --design"},
		{Path{Source: "--out", Name: "hard.csv"}, "is the input --design"},
		{Path{Source: "--out", Name: filepath.Join(dir, "datalink", "in.csv")}, "is the input --design"},
		{Path{Source: "--plot", Name: "data", Dir: true}, "holds the input"},
		{Path{Source: "--plot", Name: ".", Dir: true}, "holds the input"},
		{Path{Source: "--plot", Name: "datalink", Dir: true}, "holds the input"},
		{Path{Source: "--plot", Name: "figures", Dir: true}, ""},
		{Path{Source: "--plot", Name: "data/figures", Dir: true}, ""},
		{Path{Source: "--out", Name: "out.csv"}, ""},
		{Path{Source: "--out", Name: "-"}, ""},
		{Path{Source: "--out", Name: "data"}, "is a folder"},
		{Path{Source: "--out", Name: "none/out.csv"}, "does not exist"},
		{Path{Source: "--plot", Name: in, Dir: true}, "is the input"},
	} {
		err := Check(inputs, []Path{c.out})
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s %s: refused: %v", c.out.Source, c.out.Name, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%s %s: got %v, want an error saying %q", c.out.Source, c.out.Name, err, c.want)
		case err != nil && strings.Contains(err.Error(), "\n"):
			t.Errorf("%s %s: the message is not one line: %q", c.out.Source, c.out.Name, err)
		}
		if err != nil && strings.Contains(c.want, "input") && (!strings.Contains(err.Error(), c.out.Name) || !strings.Contains(err.Error(), in)) {
			t.Errorf("%s %s: %q does not name both paths", c.out.Source, c.out.Name, err)
		}
	}
}

// An input folder stands for the files in it: an output that is one of
// them is refused, a new file in it is not (it is no input yet).
func TestCheckInputFolder(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "a.csv"), []byte("1\n"), 0o644)
	os.WriteFile(filepath.Join(dir, ".hidden"), []byte("1\n"), 0o644)
	inputs := []Path{{Name: dir}}
	if err := Check(inputs, []Path{{Source: "--out", Name: filepath.Join(dir, "a.csv")}}); err == nil {
		t.Error("a file of the input folder was accepted as output")
	}
	if err := Check(inputs, []Path{{Source: "--out", Name: filepath.Join(dir, "new.csv")}}); err != nil {
		t.Errorf("a new file in the input folder: %v", err)
	}
	if err := Check(inputs, []Path{{Source: "--out", Name: dir, Dir: true}}); err == nil {
		t.Error("the input folder was accepted as output folder")
	}
}

// Two outputs that are one file are refused.
func TestCheckTwoOutputs(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "s.csv")
	err := Check(nil, []Path{{Source: "--out", Name: out}, {Source: "--json", Name: filepath.Join(dir, ".", "s.csv")}})
	if err == nil || !strings.Contains(err.Error(), "name the same file") {
		t.Errorf("got %v", err)
	}
}
