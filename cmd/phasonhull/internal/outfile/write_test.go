package outfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A failed write leaves the previous file as it was and nothing beside it.
func TestWriteFileAllOrNothing(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.csv")
	if err := WriteFile(path, func(w io.Writer) error { _, err := io.WriteString(w, "old\n"); return err }); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("boom")
	err := WriteFile(path, func(w io.Writer) error {
		io.WriteString(w, "half of the new")
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("got %v, want the writer's error", err)
	}
	if b, _ := os.ReadFile(path); string(b) != "old\n" {
		t.Errorf("the file is %q after a failed write", b)
	}
	assertOnly(t, dir, "out.csv")
	if err := WriteFile(path, func(w io.Writer) error { _, err := io.WriteString(w, "new\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); string(b) != "new\n" {
		t.Errorf("the file is %q", b)
	}
	st, _ := os.Stat(path)
	if st.Mode().Perm()&0o444 != 0o444 {
		t.Errorf("mode %v: the output is not readable by all", st.Mode())
	}
	assertOnly(t, dir, "out.csv")
	if err := WriteFile(filepath.Join(dir, "none", "x.csv"), func(io.Writer) error { return nil }); err == nil {
		t.Error("a file in a missing folder was written")
	}
}

// A missing folder appears whole; in an existing folder the group's files
// are replaced and the others kept.
func TestWriteFiles(t *testing.T) {
	root := t.TempDir()
	dir := filepath.Join(root, "report")
	text := func(s string) func(io.Writer) error {
		return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
	}
	if err := WriteFiles(dir, []File{{"a.txt", text("a1")}, {"b.txt", text("b1")}}); err != nil {
		t.Fatal(err)
	}
	assertOnly(t, root, "report")
	os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("mine"), 0o644)
	boom := errors.New("boom")
	if err := WriteFiles(dir, []File{{"a.txt", text("a2")}, {"b.txt", func(io.Writer) error { return boom }}}); !errors.Is(err, boom) {
		t.Fatalf("got %v", err)
	}
	for name, want := range map[string]string{"a.txt": "a1", "b.txt": "b1", "notes.txt": "mine"} {
		if b, _ := os.ReadFile(filepath.Join(dir, name)); string(b) != want {
			t.Errorf("after a failed group %s is %q, want %q", name, b, want)
		}
	}
	if err := WriteFiles(dir, []File{{"a.txt", text("a2")}, {"b.txt", text("b2")}}); err != nil {
		t.Fatal(err)
	}
	for name, want := range map[string]string{"a.txt": "a2", "b.txt": "b2", "notes.txt": "mine"} {
		if b, _ := os.ReadFile(filepath.Join(dir, name)); string(b) != want {
			t.Errorf("%s is %q, want %q", name, b, want)
		}
	}
	assertOnly(t, dir, "a.txt", "b.txt", "notes.txt")
	assertOnly(t, root, "report")
	// Names to remove go in the same commit; a missing one is no error.
	if err := WriteFiles(dir, []File{{"a.txt", text("a3")}}, "b.txt", "c.txt"); err != nil {
		t.Fatal(err)
	}
	assertOnly(t, dir, "a.txt", "notes.txt")
	if err := WriteFiles(dir, []File{{"../x", text("")}}); err == nil {
		t.Error("a name with a path was accepted")
	}
}

// assertOnly fails unless dir holds exactly the names given.
func assertOnly(t *testing.T, dir string, names ...string) {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, e := range entries {
		got = append(got, e.Name())
	}
	if strings.Join(got, ",") != strings.Join(names, ",") {
		t.Errorf("%s holds %v, want %v", dir, got, names)
	}
}
