package builtins_test

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
)

// TestLoadStaysInFolder: load follows links but refuses a target outside
// the notebook's folder without revealing anything about it (a link to
// /etc/passwd used to report its line count), and refuses a named pipe
// before opening it (reading one blocked the cell for ever).
func TestLoadStaysInFolder(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "run.csv"), []byte("t,y\n0,1\n1,2\n"), 0o644)
	os.Symlink(filepath.Join(dir, "run.csv"), filepath.Join(dir, "inside.csv"))
	os.Symlink("/etc/passwd", filepath.Join(dir, "pw"))
	if err := syscall.Mkfifo(filepath.Join(dir, "pipe"), 0o644); err != nil {
		t.Fatal(err)
	}
	s := lang.NewSession(lang.Options{Dir: dir, Builtins: builtins.Registry()})
	for _, c := range []struct{ src, want string }{
		{`load("inside.csv")`, ""},
		{`load("pw")`, "leads outside the notebook's folder"},
		{`load("pipe")`, "is not an ordinary file"},
		{`load("../x.csv")`, "outside the notebook's folder"},
	} {
		_, err := s.Run(context.Background(), c.src, nil)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s: %v", c.src, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%s: err = %v, want %q", c.src, err, c.want)
		case c.want != "" && strings.Contains(err.Error(), "row"):
			t.Errorf("%s: the error tells about the target: %v", c.src, err)
		}
	}
}
