// Command bale is the headless command-line side of baleassay: it audits
// bale samples, models the wash line and glycolysis, keeps records and
// moves them between devices as signed CBOR files. It builds with
// CGO_ENABLED=0.
package main

import (
	"baleassay/data/desk"
	"errors"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"
)

// command is one sub-command of bale. Each file of this package registers
// its commands from init, so adding a command never edits this file.
type command struct {
	name    string
	usage   string // one line: arguments and flags
	summary string
	run     func(args []string, stdout, stderr io.Writer) error
}

var commands = map[string]command{}

func register(c command) {
	if _, dup := commands[c.name]; dup {
		panic("bale: command registered twice: " + c.name)
	}
	commands[c.name] = c
}

// usageError marks wrong usage; main exits with status 2 for it.
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

func usagef(format string, args ...any) error {
	return usageError{fmt.Sprintf(format, args...)}
}

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run executes one command line and returns the exit status: 0 on
// success, 1 for bad input or a failed operation, 2 for wrong usage.
func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		if len(args) == 2 && args[0] == "help" {
			c, ok := commands[args[1]]
			if !ok {
				fmt.Fprintf(stderr, "bale: unknown command %q; run 'bale help' for the list\n", args[1])
				return 2
			}
			printCommandHelp(stdout, c)
			return 0
		}
		printHelp(stdout)
		if len(args) == 0 {
			return 2
		}
		return 0
	}
	c, ok := commands[args[0]]
	if !ok {
		fmt.Fprintf(stderr, "bale: unknown command %q; run 'bale help' for the list\n", args[0])
		return 2
	}
	for _, a := range args[1:] {
		if a == "--" {
			break
		}
		if a == "-h" || a == "--help" || a == "-help" {
			printCommandHelp(stdout, c)
			return 0
		}
	}
	err := c.run(args[1:], stdout, stderr)
	if err == nil {
		return 0
	}
	var ue usageError
	if errors.As(err, &ue) {
		fmt.Fprintf(stderr, "bale %s: %s\nusage: bale %s %s\n", c.name, ue.msg, c.name, c.usage)
		return 2
	}
	if errors.Is(err, desk.ErrUsage) {
		msg := strings.TrimPrefix(err.Error(), desk.ErrUsage.Error()+": ")
		fmt.Fprintf(stderr, "bale %s: %s\nusage: bale %s %s\n", c.name, msg, c.name, c.usage)
		return 2
	}
	fmt.Fprintf(stderr, "bale %s: %v\n", c.name, err)
	return 1
}

func printHelp(w io.Writer) {
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	fmt.Fprintln(w, "bale: grade PET bottle bales offline: audit pulls, model the wash line and glycolysis, keep records.")
	fmt.Fprintln(w, "\ncommands:")
	for _, n := range names {
		c := commands[n]
		fmt.Fprintf(w, "  %-12s %s\n  %-12s   bale %s %s\n", n, c.summary, "", n, c.usage)
	}
	fmt.Fprintln(w, "\nSafety: bales are under wire tension; hazardous containers and batteries may be inside;")
	fmt.Fprintln(w, "caustic wash, hot glycols and isocyanates hurt. See README 'Safety'; local codes and licensed practice rule.")
}

// printCommandHelp prints one command's summary and usage.
func printCommandHelp(w io.Writer, c command) {
	fmt.Fprintf(w, "bale %s: %s\n\nusage: bale %s %s\n", c.name, c.summary, c.name, c.usage)
	fmt.Fprintln(w, "\nIds may be given as the full id, or any unique prefix or suffix of at least 4 hex digits; bales also by tag, sites by name.")
	fmt.Fprintln(w, "See README for every flag and the JSON output.")
}
