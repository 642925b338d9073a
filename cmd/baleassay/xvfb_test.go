package main

import (
	"bufio"
	"os"
	"os/exec"
	"strings"
	"testing"
	"time"
)

// startXvfb starts a virtual X server and returns its display. Xvfb picks
// a free display itself and writes its number to -displayfd only once it
// accepts connections, so neither a stale socket nor a lock file left by
// a killed server can make the test talk to a display that is not there.
func startXvfb(tb testing.TB) string {
	tb.Helper()
	r, w, err := os.Pipe()
	if err != nil {
		tb.Fatal(err)
	}
	defer r.Close()
	cmd := exec.Command("Xvfb", "-displayfd", "3", "-screen", "0", "1280x800x24", "-nolisten", "tcp")
	cmd.ExtraFiles = []*os.File{w} // fd 3 in the child
	if err := cmd.Start(); err != nil {
		w.Close()
		tb.Fatal(err)
	}
	w.Close()
	tb.Cleanup(func() { cmd.Process.Kill(); cmd.Wait() })
	got := make(chan string, 1)
	go func() {
		line, _ := bufio.NewReader(r).ReadString('\n')
		got <- strings.TrimSpace(line)
	}()
	select {
	case n := <-got:
		if n == "" {
			tb.Fatal("Xvfb stopped before it reported a display")
		}
		return ":" + n
	case <-time.After(20 * time.Second):
		tb.Fatal("Xvfb did not report a display in 20 s")
	}
	return ""
}
