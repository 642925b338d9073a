package main

import (
	"baleassay/assess"
	"baleassay/data/desk"
	"fmt"
	"io"
	"text/tabwriter"
)

func init() {
	register(command{
		name:    "settings",
		usage:   "add spec|line FILE | list [--json] | show NAME [--kind spec|line]  [--store DIR|--demo]",
		summary: "keep the specs and line profiles in use in the records store, so they travel with the bundles",
		run:     runSettings,
	})
}

func runSettings(args []string, stdout, stderr io.Writer) error {
	return dispatch(args, stdout, sub("add", settingsAdd), sub("list", settingsList), sub("show", settingsShow))
}

func settingsAdd(args []string, stdout io.Writer) error {
	fs := newFlags("settings add")
	dir := storeFlag(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		return usagef("give the kind (spec or line) and the JSON file")
	}
	kind, err := desk.ParseSettingKind(pos[0])
	if err != nil {
		return usagef("unknown setting kind %q: give spec or line", pos[0])
	}
	body, err := assess.ReadFileLimited(pos[1], assess.MaxDocumentFileBytes)
	if err != nil {
		return fmt.Errorf("cannot read %s: %v", pos[1], err)
	}
	d, err := openDesk(*dir, true)
	if err != nil {
		return err
	}
	defer d.Close()
	id, updated, err := d.SaveSetting(kind, body, pos[1])
	if err != nil {
		return err
	}
	name, _ := desk.ReadSetting(kind, body, pos[1])
	if updated {
		fmt.Fprintf(stdout, "updated %s %q (%s); the earlier version stays in its history\n", kind, name, id)
		return nil
	}
	fmt.Fprintf(stdout, "saved %s %q as %s\n", kind, name, id)
	return nil
}

func settingsList(args []string, stdout io.Writer) error {
	fs := newFlags("settings list")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	_, d, err := openForArgs(fs, dir, args, 0, "")
	if err != nil {
		return err
	}
	defer d.Close()
	all, err := d.Settings()
	if err != nil {
		return err
	}
	type row struct {
		ID         string `json:"id"`
		Kind       string `json:"kind"`
		Name       string `json:"name"`
		Bytes      int    `json:"bytes"`
		Conflicted bool   `json:"conflicted"`
	}
	rows := []row{}
	for _, v := range all {
		kind := "spec"
		if v.Kind == desk.SettingLine {
			kind = "line_profile"
		}
		rows = append(rows, row{v.ID.String(), kind, v.Name, len(v.Body), v.Conflicted})
	}
	if *asJSON {
		return recJSON(stdout, rows)
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "id\tkind\tname\tbytes\t")
	for _, r := range rows {
		flag := ""
		if r.Conflicted {
			flag = "CONFLICT: see bale conflicts"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%d\t%s\n", r.ID, r.Kind, r.Name, r.Bytes, flag)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(stdout, desk.Plural(len(rows), "setting", "settings"))
	return nil
}

func settingsShow(args []string, stdout io.Writer) error {
	fs := newFlags("settings show")
	dir := storeFlag(fs)
	kindWord := fs.String("kind", "spec", "spec or line")
	pos, d, err := openForArgs(fs, dir, args, 1, "give the setting's name")
	if err != nil {
		return err
	}
	defer d.Close()
	kind, err := desk.ParseSettingKind(*kindWord)
	if err != nil {
		return usagef("unknown setting kind %q: give spec or line", *kindWord)
	}
	v, err := d.Setting(kind, pos[0])
	if err != nil {
		return err
	}
	_, err = stdout.Write(v.Body)
	return err
}
