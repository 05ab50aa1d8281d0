// Command lsys is a Jupyter kernel for linear dynamic systems.
//
//	lsys kernel <connection file>     serve a Jupyter front end
//	lsys kernelspec [--user|--prefix P|--sys-prefix] [--name N]
//	                                  register the kernel with Jupyter
//	lsys run <notebook.ipynb|script.lsys> ...
//	                                  run headless into a report
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"os"
	"os/signal"
	"path/filepath"
	"runtime/debug"
	"strconv"
	"syscall"
	"time"

	"lsys/kernel"
	"lsys/lang"
	"lsys/lsys"
)

// version is set by ./install through -ldflags "-X main.version=...".
var version = "dev"

// helpURL is set by ./install to the installed language reference.
var helpURL = ""

func main() {
	if len(os.Args) < 2 {
		usage()
		os.Exit(2)
	}
	var err error
	switch os.Args[1] {
	case "kernel":
		err = runKernel(os.Args[2:])
	case "kernelspec":
		err = runKernelspec(os.Args[2:])
	case "run":
		err = runHeadless(os.Args[2:], os.Stdout, os.Stderr)
		if errors.Is(err, errFailed) {
			os.Exit(1) // the failing cells are already named on stderr
		}
	case "version", "--version":
		fmt.Printf("lsys %s (dense linear algebra: %s)\n", version, lsys.Backend)
	case "help", "-h", "--help":
		usage()
	default:
		fmt.Fprintf(os.Stderr, "lsys: unknown command %q\n", os.Args[1])
		usage()
		os.Exit(2)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "lsys:", err)
		os.Exit(1)
	}
}

func usage() {
	fmt.Fprint(os.Stderr, `usage:
  lsys kernel <connection file>   serve a Jupyter front end (Jupyter starts this)
  lsys kernelspec [--user | --prefix DIR | --sys-prefix] [--name NAME] [--memory 8G]
                                  register the kernel with Jupyter
  lsys run NOTEBOOK.ipynb | SCRIPT.lsys [--html REPORT.html] [--inplace | -o OUT.ipynb]
           [--keep-going] [--set name=value ...] [-q]
                                  run without Jupyter: an executed notebook, a report
  lsys version                    print the version
`)
}

func runKernel(args []string) error {
	if len(args) != 1 {
		return fmt.Errorf("kernel takes one argument, the connection file Jupyter gives")
	}
	conn, err := kernel.ReadConnection(args[0])
	if err != nil {
		return err
	}
	lim, err := memoryLimits()
	if err != nil {
		return err
	}
	k, err := kernel.New(kernel.Config{Conn: conn, Version: version, HelpURL: helpURL, Limits: lim})
	if err != nil {
		return err
	}
	// SIGINT interrupts the running cell (Jupyter's signal interrupt mode);
	// SIGTERM, and the end of the process Jupyter names in JPY_PARENT_PID,
	// interrupt it and shut down (see terminate).
	sigs := make(chan os.Signal, 4)
	signal.Notify(sigs, os.Interrupt, syscall.SIGTERM)
	go func() {
		for s := range sigs {
			if s == os.Interrupt {
				k.Interrupt()
			} else {
				terminate(k, "terminated")
			}
		}
	}()
	if pid, err := strconv.Atoi(os.Getenv("JPY_PARENT_PID")); err == nil && pid > 1 {
		go watchParent(pid, func() { terminate(k, fmt.Sprintf("the Jupyter process %d that started this kernel is gone", pid)) })
	}
	_, err = k.Serve(context.Background())
	return err
}

func runKernelspec(args []string) error {
	fs := flag.NewFlagSet("kernelspec", flag.ContinueOnError)
	user := fs.Bool("user", false, "install for this user (the default)")
	prefix := fs.String("prefix", "", "install under `DIR`/share/jupyter/kernels")
	sysPrefix := fs.Bool("sys-prefix", false, "install under the sys.prefix of the Python that runs Jupyter")
	name := fs.String("name", "lsys", "kernel `NAME` as Jupyter lists it")
	memory := fs.String("memory", "", "memory budget per value, e.g. 8G (written as LSYS_MEMORY in the kernelspec's env; default a quarter of the machine's memory)")
	if err := fs.Parse(args); err != nil {
		return err
	}
	_ = user
	if *sysPrefix {
		p, err := kernel.SysPrefix()
		if err != nil {
			return err
		}
		*prefix = p
	}
	exe, err := os.Executable()
	if err != nil {
		return err
	}
	if exe, err = filepath.EvalSymlinks(exe); err != nil {
		return err
	}
	dir, err := kernel.KernelspecDir(*prefix, *name)
	if err != nil {
		return err
	}
	spec := kernel.SpecFor(exe)
	if *memory != "" {
		if _, err := lang.ParseMemory(*memory); err != nil {
			return err
		}
		spec.Env = map[string]string{"LSYS_MEMORY": *memory}
	}
	if err := kernel.WriteKernelspec(dir, spec); err != nil {
		return err
	}
	fmt.Println("lsys kernelspec written to", dir)
	return nil
}

// terminate interrupts the running cell and shuts the kernel down. Service
// managers allow a few seconds: a computation that does not notice the
// interrupt in time (a library routine between its checks) does not hold
// the exit up for more than 2 s.
func terminate(k *kernel.Kernel, why string) {
	k.Interrupt()
	k.Shutdown(false)
	time.AfterFunc(2*time.Second, func() {
		fmt.Fprintf(os.Stderr, "lsys: %s; the running cell did not stop within 2 s, exiting\n", why)
		os.Exit(0)
	})
}

// watchParent calls gone once the process pid has ended, polling twice a
// second, so a kernel whose notebook server died does not run on as an
// orphan.
func watchParent(pid int, gone func()) {
	for {
		time.Sleep(500 * time.Millisecond)
		if err := syscall.Kill(pid, 0); errors.Is(err, syscall.ESRCH) {
			gone()
			return
		}
	}
}

// memoryLimits reads the memory budget from LSYS_MEMORY (e.g. "8G"; the
// kernelspec's env can set it), defaulting to the language's (a quarter of
// the machine's memory), and sets the runtime's soft memory limit to twice
// the budget as a second line: the budget refuses a value before its bytes
// are asked for; the soft limit makes the collector work harder before the
// process grows past it.
func memoryLimits() (lang.Limits, error) {
	var lim lang.Limits
	if v := os.Getenv("LSYS_MEMORY"); v != "" {
		m, err := lang.ParseMemory(v)
		if err != nil {
			return lim, fmt.Errorf("LSYS_MEMORY: %v", err)
		}
		lim.Memory = m
	} else {
		lim.Memory = lang.DefaultMemory()
	}
	debug.SetMemoryLimit(2 * lim.Memory)
	return lim, nil
}
