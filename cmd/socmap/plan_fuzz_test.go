package main

import (
	"testing"
)

// FuzzReadPlan: no plan text may panic or hang the reader; whatever it
// accepts is a flat key → text map, and whatever it refuses is a usage error
// (exit status 2). Seeds are in testdata/fuzz/FuzzReadPlan and below.
func FuzzReadPlan(f *testing.F) {
	for _, s := range []string{
		demoPlan,
		"\ufeffatom = \"Rb87\"\n",
		"[atom]\natom = \"Na23\"\nup = \"1,0\"\n[shake]\nbias = \"11.4 G\"\n",
		"trap = [30, 60, 90]\n",
		"a = 1\n[t]\na = 2\n",
		"x = \"omega=0:4:81\"\n[[arr]]\nk = 1\n",
		"= broken\n",
		"[a.b.c]\nd = 1979-05-27T07:32:00Z\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		out, _, err := readPlanText(text, "fuzz.toml")
		if err != nil {
			if _, ok := err.(usageError); !ok {
				t.Fatalf("error %v (%T) is not a usage error", err, err)
			}
			return
		}
		if out == nil {
			t.Fatal("nil map without error")
		}
	})
}

// A plan saved with a UTF-8 byte-order mark reads like one without.
func TestPlanWithByteOrderMark(t *testing.T) {
	a, _, err := readPlanText("\ufeffatom = \"Na23\"\nbias = \"11.4 G\"\n", "bom.toml")
	if err != nil {
		t.Fatal(err)
	}
	if a["atom"] != "Na23" || a["bias"] != "11.4 G" {
		t.Errorf("got %v", a)
	}
}
