package outfile_test

import (
	"fmt"
	"os"
	"path/filepath"

	"phasonhull/cmd/phasonhull/internal/outfile"
)

// Check refuses an output that is an input of the run, whatever name it
// is given, and a folder that holds one.
func ExampleCheck() {
	dir, _ := os.MkdirTemp("", "example")
	defer os.RemoveAll(dir)
	home, _ := os.Getwd()
	defer os.Chdir(home)
	os.Chdir(dir)
	os.WriteFile("sample.csv", []byte("0\n1\n"), 0o644)
	os.Symlink("sample.csv", "latest.csv")
	in := []outfile.Path{{Name: "sample.csv"}}
	fmt.Println(outfile.Check(in, []outfile.Path{{Source: "--out", Name: "latest.csv"}}))
	fmt.Println(outfile.Check(in, []outfile.Path{{Source: "--plot", Name: ".", Dir: true}}))
	fmt.Println(outfile.Check(in, []outfile.Path{{Source: "--plot", Name: filepath.Join(".", "figures"), Dir: true}}))
	// Output:
	// --out latest.csv is the input sample.csv: refusing to write over an input
	// --plot . holds the input sample.csv: write into a folder that holds no input
	// <nil>
}
