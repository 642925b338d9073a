package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"sort"
	"text/tabwriter"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"
	"baleassay/yield"
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

// settingKind maps the command's words to the records' setting kinds.
func settingKind(word string) (string, error) {
	switch word {
	case "spec":
		return record.SettingSpec, nil
	case "line", "line_profile":
		return record.SettingLineProfile, nil
	}
	return "", usagef("unknown setting kind %q: give spec or line", word)
}

// checkSettingFile parses a spec or line profile with the same reader the
// commands use, so only documents that would load are kept, and returns
// the name the document gives itself.
func checkSettingFile(kind, path string) (string, []byte, error) {
	body, err := os.ReadFile(path)
	if err != nil {
		return "", nil, fmt.Errorf("cannot read %s: %v", path, err)
	}
	switch kind {
	case record.SettingSpec:
		s, err := assess.ParseSpec(body)
		if err != nil {
			return "", nil, fmt.Errorf("%s: %w", path, err)
		}
		return s.Name, body, nil
	default:
		l, err := yield.ReadLine(bytes.NewReader(body), path)
		if err != nil {
			return "", nil, err
		}
		return l.Name, body, nil
	}
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
	kind, err := settingKind(pos[0])
	if err != nil {
		return err
	}
	name, body, err := checkSettingFile(kind, pos[1])
	if err != nil {
		return err
	}
	if name == "" {
		return fmt.Errorf("%s has no \"name\"; give the document a name so it can be found on other devices", pos[1])
	}
	s, err := openStore(*dir)
	if err != nil {
		return err
	}
	defer s.Close()
	ev := record.Event{Kind: record.KindSetting, Setting: &record.SettingRecord{Kind: kind, Name: name, Body: body}}
	prev, found, err := findSetting(s, kind, name)
	if err != nil {
		return err
	}
	if !found {
		id, err := saveNew(s, ev, false)
		if err != nil {
			return err
		}
		fmt.Fprintf(stdout, "saved %s %q as %s\n", pos[0], name, id)
		return nil
	}
	if _, err := s.Supersede(prev.ID, ev, store.SaveOptions{}); err != nil {
		return recSaveError(err)
	}
	fmt.Fprintf(stdout, "updated %s %q (%s); the earlier version stays in its history\n", pos[0], name, prev.ID)
	return nil
}

// settingView is one setting with its current document.
type settingView struct {
	ID         record.EntityID
	Record     record.SettingRecord
	Conflicted bool
}

func settings(s *store.Store) ([]settingView, error) {
	states, err := s.Entities(record.KindSetting)
	if err != nil {
		return nil, err
	}
	var out []settingView
	for _, st := range states {
		cur, ok := st.Current()
		if !ok || cur.Setting == nil {
			continue
		}
		out = append(out, settingView{st.ID, *cur.Setting, st.Conflicted()})
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].Record.Kind != out[j].Record.Kind {
			return out[i].Record.Kind < out[j].Record.Kind
		}
		return out[i].Record.Name < out[j].Record.Name
	})
	return out, nil
}

// findSetting finds the live setting of a kind by name.
func findSetting(s *store.Store, kind, name string) (settingView, bool, error) {
	all, err := settings(s)
	if err != nil {
		return settingView{}, false, err
	}
	for _, v := range all {
		if v.Record.Kind == kind && v.Record.Name == name {
			return v, true, nil
		}
	}
	return settingView{}, false, nil
}

func settingsList(args []string, stdout io.Writer) error {
	fs := newFlags("settings list")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	_, s, err := openForArgs(fs, dir, args, 0, "")
	if err != nil {
		return err
	}
	defer s.Close()
	all, err := settings(s)
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
		rows = append(rows, row{v.ID.String(), v.Record.Kind, v.Record.Name, len(v.Record.Body), v.Conflicted})
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
	fmt.Fprintf(stdout, "%d settings\n", len(rows))
	return nil
}

func settingsShow(args []string, stdout io.Writer) error {
	fs := newFlags("settings show")
	dir := storeFlag(fs)
	kindWord := fs.String("kind", "spec", "spec or line")
	pos, s, err := openForArgs(fs, dir, args, 1, "give the setting's name")
	if err != nil {
		return err
	}
	defer s.Close()
	kind, err := settingKind(*kindWord)
	if err != nil {
		return err
	}
	v, found, err := findSetting(s, kind, pos[0])
	if err != nil {
		return err
	}
	if !found {
		return fmt.Errorf("no %s named %q in %s; 'bale settings list' shows what there is", *kindWord, pos[0], s.Dir())
	}
	if v.Conflicted {
		return fmt.Errorf("%s %q was changed on two devices at once; keep one with 'bale conflicts resolve %s EVENT'", *kindWord, pos[0], v.ID)
	}
	_, err = stdout.Write(v.Record.Body)
	return err
}
