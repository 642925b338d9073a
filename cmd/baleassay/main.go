// Command baleassay is the field app: a window for receiving bales,
// tallying their pulls, reading the outcome and handing records to the
// lab. It parses its flags, opens the store through data/desk and runs the
// screens of package ui; everything else lives there.
//
//	baleassay [--store DIR | --demo] [--high-contrast] [--scale S] [--size WxH]
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"time"

	"gioui.org/app"
	"gioui.org/unit"

	"baleassay/ui"
	"baleassay/ui/theme"
)

// options are the parsed command line.
type options struct {
	store    string
	demo     bool
	contrast bool
	scale    float64
	w, h     int
}

func parseFlags(args []string, stderr io.Writer) (options, error) {
	var o options
	fs := flag.NewFlagSet("baleassay", flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.StringVar(&o.store, "store", "", "records store `folder` (default: the user data folder, as for bale)")
	fs.BoolVar(&o.demo, "demo", false, "open the demo store (invented yards and bales)")
	fs.BoolVar(&o.contrast, "high-contrast", false, "start with the high-contrast colours for sunlight")
	fs.Float64Var(&o.scale, "scale", 1, "text scale, 1 to 1.5")
	size := fs.String("size", "1280x800", "window size in dp, `WxH`")
	if err := fs.Parse(args); err != nil {
		return o, err
	}
	if fs.NArg() > 0 {
		return o, fmt.Errorf("unexpected argument %q: baleassay takes only flags", fs.Arg(0))
	}
	if o.store != "" && o.demo {
		return o, errors.New("give either --store DIR or --demo, not both")
	}
	if o.scale < 0.5 || o.scale > 3 {
		return o, fmt.Errorf("--scale %s: give a text scale from 0.5 to 3", strconv.FormatFloat(o.scale, 'f', -1, 64))
	}
	w, h, ok := strings.Cut(*size, "x")
	o.w, _ = strconv.Atoi(w)
	o.h, _ = strconv.Atoi(h)
	if !ok || o.w < 320 || o.h < 320 {
		return o, fmt.Errorf("--size %q: give the window size as WIDTHxHEIGHT in dp, each at least 320", *size)
	}
	return o, nil
}

func main() {
	start := time.Now()
	o, err := parseFlags(os.Args[1:], os.Stderr)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			os.Exit(0)
		}
		fmt.Fprintln(os.Stderr, "baleassay:", err)
		os.Exit(2)
	}
	st, err := openStore(o)
	if err != nil {
		fmt.Fprintln(os.Stderr, "baleassay:", err)
		os.Exit(1)
	}
	defer st.d.Close()
	cfg := ui.Config{Desk: st.d, Scale: float32(o.scale), Demo: st.demo}
	if st.noOwn {
		cfg.StartOwn = startOwn
	}
	if o.contrast {
		cfg.Mode = theme.HighContrast
	}
	a := ui.New(cfg)
	if os.Getenv("BALEASSAY_FRAME_LOG") != "" {
		a.OnFirstFrame(func() {
			fmt.Fprintf(os.Stderr, "baleassay: first frame %d ms after start\n", time.Since(start).Milliseconds())
		})
	}
	go func() {
		w := new(app.Window)
		w.Option(app.Title("baleassay"), app.Size(unit.Dp(o.w), unit.Dp(o.h)))
		err := a.Run(w)
		a.Close()
		a.Desk().Close()
		if err != nil {
			fmt.Fprintln(os.Stderr, "baleassay:", err)
			os.Exit(1)
		}
		os.Exit(0)
	}()
	app.Main()
}
