package kernel_test

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
)

// python is Debian's Python, which has Jupyter; the python3 first on PATH
// may be another one without it.
const python = "/usr/bin/python3"

// needJupyter fails (never skips) when Jupyter's test tools are missing: the
// README's ./install and .ci/run install them, and these tests must run.
func needJupyter(t *testing.T, modules ...string) {
	t.Helper()
	args := []string{"-c", "import " + strings.Join(modules, ", ")}
	if out, err := exec.Command(python, args...).CombinedOutput(); err != nil {
		t.Fatalf("%s cannot import %v: %v\n%s\nInstall Debian's packages: apt-get install python3-jupyter-kernel-test jupyter-client jupyter-console jupyter-nbconvert python3-nbclient (./install does this as root).",
			python, modules, err, out)
	}
}

var (
	buildOnce          sync.Once
	builtBin, builtEnv = "", []string(nil)
	buildErr           error
	buildDir           string
)

// TestMain removes the shared build folder after the tests.
func TestMain(m *testing.M) {
	code := m.Run()
	if buildDir != "" {
		os.RemoveAll(buildDir)
	}
	os.Exit(code)
}

// buildKernel builds the lsys binary once per test run and writes a
// kernelspec for it into a private Jupyter data folder; it returns the binary
// and the environment that makes Jupyter find that kernelspec.
func buildKernel(t *testing.T) (bin string, env []string) {
	t.Helper()
	buildOnce.Do(func() {
		dir, err := os.MkdirTemp("", "lsys-kernel-test-")
		if err != nil {
			buildErr = err
			return
		}
		buildDir = dir
		bin := filepath.Join(dir, "lsys")
		if out, err := exec.Command("go", "build", "-o", bin, "..").CombinedOutput(); err != nil {
			buildErr = fmt.Errorf("go build: %v\n%s", err, out)
			return
		}
		prefix := filepath.Join(dir, "prefix")
		if out, err := exec.Command(bin, "kernelspec", "--prefix", prefix).CombinedOutput(); err != nil {
			buildErr = fmt.Errorf("lsys kernelspec: %v\n%s", err, out)
			return
		}
		builtBin = bin
		builtEnv = append(os.Environ(), "JUPYTER_PATH="+filepath.Join(prefix, "share", "jupyter"),
			"JUPYTER_RUNTIME_DIR="+filepath.Join(dir, "runtime"), "PYDEVD_DISABLE_FILE_VALIDATION=1")
	})
	if buildErr != nil {
		t.Fatal(buildErr)
	}
	return builtBin, builtEnv
}

// TestConformance runs jupyter_kernel_test against the kernel.
func TestConformance(t *testing.T) {
	needJupyter(t, "jupyter_kernel_test", "jupyter_client")
	_, env := buildKernel(t)
	cmd := exec.Command(python, "-m", "unittest", "-v", "conformance")
	cmd.Dir = "testdata"
	cmd.Env = env
	out, err := cmd.CombinedOutput()
	text := string(out)
	ran := regexp.MustCompile(`Ran (\d+) tests?`).FindStringSubmatch(text)
	if err != nil || ran == nil {
		t.Fatalf("conformance suite failed: %v\n%s", err, text)
	}
	for _, line := range strings.Split(text, "\n") {
		if strings.HasPrefix(line, "test_") && strings.Contains(line, "skipped") {
			t.Errorf("a conformance sample family was skipped; fill it in: %s", line)
		}
	}
	t.Logf("jupyter_kernel_test: %s tests passed\n%s", ran[1], text)
}
