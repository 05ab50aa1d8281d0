package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strings"

	"lsys/runner"
)

// setFlags collects repeated --set name=value.
type setFlags []string

func (s *setFlags) String() string     { return strings.Join(*s, " ") }
func (s *setFlags) Set(v string) error { *s = append(*s, v); return nil }

// errFailed is returned when a cell failed; its messages are already out.
var errFailed = errors.New("a cell failed")

// runHeadless is `lsys run`: the headless front end. Flags may come before
// or after the file.
func runHeadless(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("run", flag.ContinueOnError)
	fs.SetOutput(stderr)
	htmlOut := fs.String("html", "", "write a standalone HTML report to `REPORT.html`")
	out := fs.String("o", "", "write the executed notebook to `OUT.ipynb`")
	inplace := fs.Bool("inplace", false, "write the executed notebook over the input notebook")
	keepGoing := fs.Bool("keep-going", false, "run the remaining cells after a failing one")
	quiet := fs.Bool("q", false, "no progress lines on stderr")
	var sets setFlags
	fs.Var(&sets, "set", "override a binding of the cell tagged parameters: `name=value` (repeatable)")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: lsys run NOTEBOOK.ipynb | SCRIPT.lsys [--html REPORT.html] [--inplace | -o OUT.ipynb] [--keep-going] [--set name=value ...] [-q]")
		fs.PrintDefaults()
	}
	var files []string
	for {
		if err := fs.Parse(args); err != nil {
			return err
		}
		if fs.NArg() == 0 {
			break
		}
		files = append(files, fs.Arg(0))
		args = fs.Args()[1:]
	}
	if len(files) != 1 {
		fs.Usage()
		return fmt.Errorf("run takes one notebook or script, not %d", len(files))
	}
	in := files[0]
	isNotebook := strings.HasSuffix(in, ".ipynb")
	if *inplace && *out != "" {
		return fmt.Errorf("give --inplace or -o, not both")
	}
	if *inplace && !isNotebook {
		return fmt.Errorf("--inplace writes a notebook over its input; %s is a script: use -o OUT.ipynb", in)
	}
	data, err := os.ReadFile(in)
	if err != nil {
		return err
	}
	var nb *runner.Notebook
	if isNotebook {
		if nb, err = runner.ReadNotebook(data); err != nil {
			return fmt.Errorf("%s: %w", in, err)
		}
	} else {
		nb = runner.NewNotebook(runner.SplitScript(string(data)))
	}
	digest := runner.Digest(nb, sets)

	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	lim, err := memoryLimits()
	if err != nil {
		return err
	}
	opt := runner.Options{Dir: filepath.Dir(in), Set: sets, KeepGoing: *keepGoing, Limits: lim}
	if !*quiet {
		opt.Progress = stderr
	}
	res, err := runner.Run(ctx, nb, opt)
	if err != nil {
		return fmt.Errorf("%s: %w", in, err)
	}

	target := *out
	if *inplace {
		target = in
	}
	if target != "" {
		if err := os.WriteFile(target, nb.Encode(), 0o644); err != nil {
			return err
		}
	}
	if *htmlOut != "" {
		title := strings.TrimSuffix(filepath.Base(in), filepath.Ext(in))
		rep := runner.Report(nb, res, runner.ReportInfo{Title: title, Version: version, Digest: digest})
		if err := os.WriteFile(*htmlOut, rep, 0o644); err != nil {
			return err
		}
	}
	if target == "" && *htmlOut == "" {
		io.WriteString(stdout, runner.Transcript(nb))
	}
	for _, f := range res.Failures {
		fmt.Fprintf(stderr, "lsys run: %s: %s\n", in, f)
	}
	if len(res.Failures) > 0 {
		return errFailed
	}
	return ctx.Err()
}
