package lang_test

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
)

// TestREADMETourRuns runs the cells of the README's tour (code blocks with
// no language tag, before the generated reference) in one session, so the
// front page never shows a cell that fails. A block that starts with
// "line " is a quoted error message, not a cell.
func TestREADMETourRuns(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	if i := strings.Index(text, "## Language reference"); i >= 0 {
		text = text[:i]
	}
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	cells := 0
	var cell []string
	inBlock, runIt := false, false
	for _, line := range strings.Split(text, "\n") {
		if strings.HasPrefix(line, "```") {
			if !inBlock {
				inBlock, runIt, cell = true, line == "```", nil
				continue
			}
			inBlock = false
			src := strings.Join(cell, "\n")
			if !runIt || strings.HasPrefix(src, "line ") {
				continue
			}
			cells++
			if _, err := s.Run(context.Background(), src, nil); err != nil {
				t.Errorf("README cell fails:\n%s\n%v", src, err)
			}
			continue
		}
		if inBlock {
			cell = append(cell, line)
		}
	}
	if cells == 0 {
		t.Fatal("found no cells in the README's tour")
	}
}
