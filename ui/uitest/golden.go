// Package uitest renders Gio layouts without a display and compares them
// with reference PNGs, for the tests of ui and its sub-packages.
//
// Rendering uses gioui.org/gpu/headless on Mesa's software EGL
// (EGL_PLATFORM=surfaceless when there is no display). When no backend
// works the test fails if the environment variable CI is set (a UI test
// that skips in CI is a failure), and skips elsewhere with what to
// install.
package uitest

import (
	"flag"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"os"
	"path/filepath"
	"sync"
	"testing"
	"time"

	"gioui.org/gpu/headless"
	"gioui.org/io/input"
	"gioui.org/layout"
	"gioui.org/op"
	"gioui.org/unit"
)

// Update rewrites the reference images instead of comparing.
var Update = flag.Bool("update", false, "rewrite the reference PNGs in testdata/")

// Tolerances of the comparison: software EGL and Vulkan renders differ by
// up to 3/255 a channel on anti-aliased edges (measured here); a few
// pixels more may differ by more where glyph edges round differently.
const (
	ChannelTolerance = 8    // per channel, of 255
	MaxBadShare      = 1e-3 // share of pixels beyond it
)

var envOnce sync.Once

func setEnv() {
	envOnce.Do(func() {
		if os.Getenv("DISPLAY") == "" && os.Getenv("EGL_PLATFORM") == "" {
			os.Setenv("EGL_PLATFORM", "surfaceless")
		}
	})
}

// Missing reports a missing prerequisite: fatal under CI, a skip
// elsewhere.
func Missing(t testing.TB, format string, args ...any) {
	t.Helper()
	msg := fmt.Sprintf(format, args...)
	if os.Getenv("CI") != "" {
		t.Fatalf("%s (CI is set: a UI test may not skip)", msg)
	}
	t.Skip(msg)
}

// Frame is the fixed time of every test frame, so animations and
// carets render the same each run.
var Frame = time.Date(2026, 11, 24, 9, 30, 0, 0, time.UTC)

// Context returns a layout context for a frame of size px at 1 px per dp.
func Context(ops *op.Ops, r *input.Router, size image.Point) layout.Context {
	gtx := layout.Context{
		Ops:         ops,
		Metric:      unit.Metric{PxPerDp: 1, PxPerSp: 1},
		Constraints: layout.Exact(size),
		Now:         Frame,
	}
	if r != nil {
		gtx.Source = r.Source()
	}
	return gtx
}

// Render lays out lay once in a w×h headless window and returns the
// picture. r may be nil (then controls render as disabled).
func Render(t testing.TB, w, h int, r *input.Router, lay func(gtx layout.Context)) *image.RGBA {
	t.Helper()
	setEnv()
	win, err := headless.NewWindow(w, h)
	if err != nil {
		Missing(t, "no headless GPU backend: %v (install libegl1 libgles2 libgl1-mesa-dri, or mesa-vulkan-drivers; scripts/deps.sh does)", err)
	}
	defer win.Release()
	ops := new(op.Ops)
	gtx := Context(ops, r, image.Pt(w, h))
	lay(gtx)
	if r != nil {
		r.Frame(ops)
	}
	if err := win.Frame(ops); err != nil {
		t.Fatalf("headless frame: %v", err)
	}
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	if err := win.Screenshot(img); err != nil {
		t.Fatalf("headless screenshot: %v", err)
	}
	return img
}

// Match compares img with testdata/name.png. With -update it writes the
// reference instead; on a mismatch it writes testdata/name-bad.png and
// fails.
func Match(t testing.TB, name string, img *image.RGBA) {
	t.Helper()
	ref := filepath.Join("testdata", name+".png")
	bad := filepath.Join("testdata", name+"-bad.png")
	if *Update {
		if err := WritePNG(ref, img); err != nil {
			t.Fatal(err)
		}
		os.Remove(bad)
		return
	}
	want, err := ReadPNG(ref)
	if err != nil {
		t.Fatalf("reference %s: %v (run the test with -update to make it)", ref, err)
	}
	n, worst := Diff(want, img)
	total := img.Bounds().Dx() * img.Bounds().Dy()
	if want.Bounds() != img.Bounds() || float64(n) > MaxBadShare*float64(total) {
		if err := WritePNG(bad, img); err != nil {
			t.Error(err)
		}
		t.Fatalf("%s: %d of %d pixels differ by more than %d (worst %d); wrote %s (compare with %s; -update accepts it)",
			name, n, total, ChannelTolerance, worst, bad, ref)
	}
	os.Remove(bad)
}

// Diff counts pixels whose channels differ by more than the tolerance,
// and returns the largest difference seen. Images of different bounds
// differ everywhere.
func Diff(a, b image.Image) (n int, worst int) {
	if a.Bounds() != b.Bounds() {
		return a.Bounds().Dx() * a.Bounds().Dy(), 255
	}
	r := a.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			ca := color.NRGBAModel.Convert(a.At(x, y)).(color.NRGBA)
			cb := color.NRGBAModel.Convert(b.At(x, y)).(color.NRGBA)
			d := max(absDiff(ca.R, cb.R), absDiff(ca.G, cb.G), absDiff(ca.B, cb.B), absDiff(ca.A, cb.A))
			if d > worst {
				worst = d
			}
			if d > ChannelTolerance {
				n++
			}
		}
	}
	return n, worst
}

func absDiff(a, b uint8) int {
	if a > b {
		return int(a - b)
	}
	return int(b - a)
}

// ReadPNG reads a PNG file.
func ReadPNG(path string) (image.Image, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return png.Decode(f)
}

// WritePNG writes img as a PNG file, best compression (references are
// committed).
func WritePNG(path string, img image.Image) error {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	enc := png.Encoder{CompressionLevel: png.BestCompression}
	if err := enc.Encode(f, img); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
