package kernel

import (
	"bytes"
	"encoding/json"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
)

// KernelSpec is the kernel.json Jupyter reads to start us.
type KernelSpec struct {
	Argv          []string          `json:"argv"`
	DisplayName   string            `json:"display_name"`
	Language      string            `json:"language"`
	InterruptMode string            `json:"interrupt_mode"`
	Env           map[string]string `json:"env,omitempty"`
	Metadata      map[string]any    `json:"metadata,omitempty"`
}

// SpecFor returns the kernelspec that starts the binary at exe.
func SpecFor(exe string) KernelSpec {
	return KernelSpec{
		Argv:          []string{exe, "kernel", "{connection_file}"},
		DisplayName:   "lsys (linear systems)",
		Language:      "lsys",
		InterruptMode: "message",
	}
}

// KernelspecDir returns the folder Jupyter searches for kernel "name":
// under prefix when given, else the user's Jupyter data folder
// (JUPYTER_DATA_DIR, then XDG_DATA_HOME/jupyter, then ~/.local/share/jupyter).
func KernelspecDir(prefix, name string) (string, error) {
	if prefix != "" {
		return filepath.Join(prefix, "share", "jupyter", "kernels", name), nil
	}
	if d := os.Getenv("JUPYTER_DATA_DIR"); d != "" {
		return filepath.Join(d, "kernels", name), nil
	}
	if d := os.Getenv("XDG_DATA_HOME"); d != "" {
		return filepath.Join(d, "jupyter", "kernels", name), nil
	}
	home, err := os.UserHomeDir()
	if err != nil {
		return "", fmt.Errorf("no home folder to install the kernelspec into (%v); use --prefix", err)
	}
	return filepath.Join(home, ".local", "share", "jupyter", "kernels", name), nil
}

// SysPrefix asks the Python that runs Jupyter for its sys.prefix (what
// --sys-prefix means to other kernels). Debian's Jupyter runs on
// /usr/bin/python3, so that one is asked first.
func SysPrefix() (string, error) {
	for _, py := range []string{"/usr/bin/python3", "python3"} {
		out, err := exec.Command(py, "-c", "import sys; print(sys.prefix)").Output()
		if err == nil {
			return strings.TrimSpace(string(out)), nil
		}
	}
	return "", fmt.Errorf("no python3 found to tell sys.prefix; use --prefix instead")
}

// WriteKernelspec writes kernel.json, our editor mode (kernel.js) and its
// colours (kernel.css), and our logos into dir.
func WriteKernelspec(dir string, spec KernelSpec) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	b, err := json.MarshalIndent(spec, "", "  ")
	if err != nil {
		return err
	}
	files := map[string][]byte{"kernel.json": append(b, '\n'), "logo-svg.svg": []byte(LogoSVG), "kernel.js": []byte(EditorModeJS()), "kernel.css": []byte(EditorCSS())}
	for _, size := range []int{32, 64} {
		var buf bytes.Buffer
		if err := png.Encode(&buf, Logo(size)); err != nil {
			return err
		}
		files[fmt.Sprintf("logo-%dx%d.png", size, size)] = buf.Bytes()
	}
	for _, name := range []string{"kernel.json", "kernel.js", "kernel.css", "logo-svg.svg", "logo-32x32.png", "logo-64x64.png"} {
		if err := os.WriteFile(filepath.Join(dir, name), files[name], 0o644); err != nil {
			return err
		}
	}
	return nil
}

// Logo colours: blue and vermillion from Okabe & Ito (2008), on near-black.
var (
	logoBack  = color.NRGBA{0x1d, 0x23, 0x2b, 0xff}
	logoWave  = color.NRGBA{0x56, 0xb4, 0xe9, 0xff} // sky blue
	logoCross = color.NRGBA{0xe6, 0x9f, 0x00, 0xff} // orange
)

// Logo draws our mark at size x size pixels: a decaying oscillation (a
// lightly damped mode's impulse response) and a pole cross.
func Logo(size int) image.Image {
	img := image.NewNRGBA(image.Rect(0, 0, size, size))
	s := float64(size)
	r := s * 0.18 // corner radius
	for y := 0; y < size; y++ {
		for x := 0; x < size; x++ {
			if insideRounded(float64(x)+0.5, float64(y)+0.5, s, r) {
				img.Set(x, y, logoBack)
			}
		}
	}
	// The wave: y = e^{-0.35 t} cos(2t) over t in [0, 4 pi], drawn thick.
	thick := s / 22
	for i := 0; i <= 4*size; i++ {
		t := float64(i) / float64(4*size) * 4 * math.Pi
		px := s*0.12 + t/(4*math.Pi)*s*0.76
		py := s*0.5 - s*0.3*math.Exp(-0.35*t)*math.Cos(2*t)
		dot(img, px, py, thick, logoWave)
	}
	// The cross, top right.
	cx, cy, h := s*0.78, s*0.22, s*0.09
	for i := -10; i <= 10; i++ {
		f := float64(i) / 10 * h
		dot(img, cx+f, cy+f, thick*0.8, logoCross)
		dot(img, cx+f, cy-f, thick*0.8, logoCross)
	}
	return img
}

func insideRounded(x, y, s, r float64) bool {
	cx := math.Max(r, math.Min(s-r, x))
	cy := math.Max(r, math.Min(s-r, y))
	return (x-cx)*(x-cx)+(y-cy)*(y-cy) <= r*r
}

func dot(img *image.NRGBA, x, y, rad float64, c color.NRGBA) {
	for yy := int(y - rad - 1); yy <= int(y+rad+1); yy++ {
		for xx := int(x - rad - 1); xx <= int(x+rad+1); xx++ {
			dx, dy := float64(xx)+0.5-x, float64(yy)+0.5-y
			if dx*dx+dy*dy <= rad*rad && image.Pt(xx, yy).In(img.Rect) {
				img.SetNRGBA(xx, yy, c)
			}
		}
	}
}

// LogoSVG is the same mark as a vector image.
const LogoSVG = `<svg xmlns="http://www.w3.org/2000/svg" width="64" height="64" viewBox="0 0 64 64">
<rect width="64" height="64" rx="11.5" fill="#1d232b"/>
<path d="M7.7 12.8 C10 40 14 52 19 42 S27 20 32 30 S40 40 45 34 S52 30 56.3 32" fill="none" stroke="#56b4e9" stroke-width="3.2" stroke-linecap="round"/>
<path d="M44 8.3 L55.8 20.1 M44 20.1 L55.8 8.3" stroke="#e69f00" stroke-width="2.6" stroke-linecap="round"/>
</svg>
`
