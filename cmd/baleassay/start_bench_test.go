package main

import (
	"bufio"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// BenchmarkStartToFirstFrame starts the real app under Xvfb on a fresh
// store and times, per start, process start to the first frame handed to
// the GPU (the app's own clock, printed with BALEASSAY_FRAME_LOG) and to
// the window found by xdotool. Goal: under 1 s. Baseline in the same run:
// starting and ending `bale help`, a process with no window.
func BenchmarkStartToFirstFrame(b *testing.B) {
	for _, tool := range []string{"Xvfb", "xdotool"} {
		if _, err := exec.LookPath(tool); err != nil {
			b.Skipf("%s not found", tool)
		}
	}
	dir := b.TempDir()
	app, bale := filepath.Join(dir, "baleassay"), filepath.Join(dir, "bale")
	for _, x := range [][2]string{{app, "."}, {bale, "../bale"}} {
		if out, err := exec.Command("go", "build", "-o", x[0], x[1]).CombinedOutput(); err != nil {
			b.Fatalf("%v %s", err, out)
		}
	}
	disp := startXvfb(b)
	b.Run("baseline-bale-help", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if err := exec.Command(bale, "help").Run(); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("app-first-frame", func(b *testing.B) {
		var appMs float64
		for i := 0; i < b.N; i++ {
			store := filepath.Join(dir, "store"+strconv.Itoa(i))
			cmd := exec.Command(app, "--store", store)
			cmd.Env = append(os.Environ(), "DISPLAY="+disp, "BALEASSAY_FRAME_LOG=1", "XDG_RUNTIME_DIR="+dir)
			stderr, _ := cmd.StderrPipe()
			if err := cmd.Start(); err != nil {
				b.Fatal(err)
			}
			sc := bufio.NewScanner(stderr)
			for sc.Scan() {
				line := sc.Text()
				if i := strings.Index(line, "first frame "); i >= 0 {
					f := strings.Fields(line[i+len("first frame "):])
					ms, _ := strconv.ParseFloat(f[0], 64)
					appMs += ms
					break
				}
			}
			cmd.Process.Kill()
			cmd.Wait()
		}
		b.ReportMetric(appMs/float64(b.N), "ms-to-first-frame")
	})
}
