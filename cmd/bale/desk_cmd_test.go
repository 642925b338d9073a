package main

// Source: invented sites, bales and pulls; checks follow the commands'
// documented behaviour.

import (
	"strings"
	"testing"
)

func TestHelpForEveryCommand(t *testing.T) {
	for name := range commands {
		for _, args := range [][]string{{"help", name}, {name, "--help"}} {
			code, out, errs := recRun(t, args...)
			if code != 0 || !strings.Contains(out, "usage: bale "+name) {
				t.Errorf("%v: exit %d %q %q", args, code, out, errs)
			}
		}
	}
	if code, out, _ := recRun(t, "--help"); code != 0 || !strings.Contains(out, "commands:") {
		t.Fatal("bale --help")
	}
}

func TestStoredBaleAssessedWhereItIs(t *testing.T) {
	dir := t.TempDir()
	st := []string{"--store", dir}
	recMust(t, append([]string{"sites", "add", "--name", "Tansy Cross Yard", "--lat", "44.921", "--lon", "4.495"}, st...)...)
	recMust(t, append([]string{"bales", "add", "--site", "tansy cross yard", "--kg", "548", "--tag", "VO-77", "--spec", "glycol-feed"}, st...)...)
	stdin = strings.NewReader("\ufeffpull,pet_clear,pvc,closures\nP1,23.9,0.1,1.7\nP2,12.8,0.16,0.7\nP3,20.1,0.05,1.1\n")
	out := recMust(t, append([]string{"pulls", "add", "VO-77", "-"}, st...)...)
	if !strings.Contains(out, "saved 3 pulls") {
		t.Fatalf("pulls from stdin: %s", out)
	}
	out = recMust(t, append([]string{"assess", "VO-77"}, st...)...)
	if !strings.Contains(out, "Spec glycol-feed") || !strings.Contains(out, "VO-77") {
		t.Fatalf("assess BALE: %s", out)
	}
	out = recMust(t, append([]string{"yield", "VO-77", "--draws", "200"}, st...)...)
	if !strings.Contains(out, "clean flake, kg") {
		t.Fatalf("yield BALE: %s", out)
	}
	out = recMust(t, append([]string{"find", "tansy"}, st...)...)
	if !strings.Contains(out, "1 site, 0 bales") {
		t.Fatalf("find: %s", out)
	}
	out = recMust(t, append([]string{"bales", "list"}, st...)...)
	if !strings.Contains(out, "1 bale") || !strings.Contains(out, "%") {
		t.Fatalf("bales list: %s", out)
	}
	// A second pull P1 and an over-weight pull are refused on save.
	stdin = strings.NewReader("pull,pet_clear\nP1,2\n")
	if code, _, errs := recRun(t, append([]string{"pulls", "add", "VO-77", "-"}, st...)...); code != 1 || !strings.Contains(errs, "already has a pull") {
		t.Fatalf("duplicate label: %d %s", code, errs)
	}
	stdin = strings.NewReader("pull,pet_clear\nP9,700\n")
	if code, _, errs := recRun(t, append([]string{"pulls", "add", "VO-77", "-"}, st...)...); code != 1 || !strings.Contains(errs, "gross mass") {
		t.Fatalf("over gross: %d %s", code, errs)
	}
	stdin = strings.NewReader("pull;pet_clear\nP9;7\n")
	if code, _, errs := recRun(t, append([]string{"pulls", "add", "VO-77", "-"}, st...)...); code != 1 || !strings.Contains(errs, "semicolons") {
		t.Fatalf("semicolons: %d %s", code, errs)
	}
	out = recMust(t, append([]string{"bales", "edit", "VO-77", "--kg", "560"}, st...)...)
	if !strings.Contains(out, "560 kg") {
		t.Fatalf("bales edit: %s", out)
	}
	if code, _, errs := recRun(t, append([]string{"bales", "edit", "VO-77", "--dims", "122x76x152"}, st...)...); code != 1 || !strings.Contains(errs, "give metres") {
		t.Fatalf("centimetres: %d %s", code, errs)
	}
	out = recMust(t, append([]string{"show", "VO-77"}, st...)...)
	if !strings.Contains(out, "audit  3 pulls") || !strings.Contains(out, "2 events") {
		t.Fatalf("show: %s", out)
	}
}
