package main

import (
	"bytes"
	"math/big"
	"strings"
	"testing"
	"time"
)

func TestGroupDigits(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want string
	}{
		{"0", "0"},
		{"7", "7"},
		{"9999", "9999"},
		{"10000", "10\u2009000"},
		{"-12345", "-12\u2009345"},
		{"123456789", "123\u2009456\u2009789"},
		// 2^100, from memory and recomputed: 1267650600228229401496703205376.
		{"1267650600228229401496703205376", "1\u2009267\u2009650\u2009600\u2009228\u2009229\u2009401\u2009496\u2009703\u2009205\u2009376"},
	} {
		n, _ := new(big.Int).SetString(tc.in, 10)
		if got := groupDigits(n); got != tc.want {
			t.Errorf("groupDigits(%s) = %q, want %q", tc.in, got, tc.want)
		}
		if strings.ReplaceAll(groupDigits(n), "\u2009", "") != tc.in {
			t.Errorf("groupDigits(%s) does not keep every digit", tc.in)
		}
	}
}

func TestCutParam(t *testing.T) {
	for _, tc := range []struct {
		in          string
		name, value string
		ok          bool
	}{
		{"budget=300", "budget", "300", true},
		{"max_load2=3*4", "max_load2", "3*4", true},
		{"city=\"a=b\"", "city", "\"a=b\"", true},
		{"budget", "", "", false},
		{"=3", "", "", false},
		{"budget=", "", "", false},
		{"Budget=3", "", "", false},
		{"2x=3", "", "", false},
		{"bad name=3", "", "", false},
	} {
		name, value, ok := cutParam(tc.in)
		if name != tc.name || value != tc.value || ok != tc.ok {
			t.Errorf("cutParam(%q) = %q, %q, %v; want %q, %q, %v", tc.in, name, value, ok, tc.name, tc.value, tc.ok)
		}
	}
}

func TestCostAndGapText(t *testing.T) {
	opt := costVec{{Priority: 2, Value: 1}, {Priority: 0, Value: 100}}
	for _, tc := range []struct {
		c         costVec
		cost, gap string
	}{
		{opt, "1 / 100", "optimal"},
		{costVec{{2, 1}, {0, 130}}, "1 / 130", "+30 at priority 0"},
		{costVec{{2, 2}, {0, 90}}, "2 / 90", "+1 at priority 2, −10 at priority 0"},
	} {
		if got := costText(tc.c); got != tc.cost {
			t.Errorf("costText(%v) = %q, want %q", tc.c, got, tc.cost)
		}
		if got := gapText(opt, tc.c); got != tc.gap {
			t.Errorf("gapText(%v) = %q, want %q", tc.c, got, tc.gap)
		}
	}
	if got := costText(nil); got != "0" {
		t.Errorf("costText(nil) = %q, want 0", got)
	}
}

// TestProgress checks that a long stage is shown and a short one is not.
func TestProgress(t *testing.T) {
	var buf bytes.Buffer
	p := &progress{w: &buf, on: true, after: 5 * time.Millisecond}
	p.begin("compile")
	p.end(true) // at once: nothing shown
	if buf.Len() != 0 {
		t.Errorf("a short stage printed %q", buf.String())
	}
	p.begin("compile")
	time.Sleep(30 * time.Millisecond)
	p.end(true)
	if out := buf.String(); !strings.Contains(out, "compile: ") || !strings.HasSuffix(out, "\n") || !strings.Contains(out, "done in") {
		t.Errorf("a long stage printed %q", out)
	}
	buf.Reset()
	p.begin("compile")
	time.Sleep(30 * time.Millisecond)
	p.end(false)
	if out := buf.String(); !strings.Contains(out, "compile: stopped after") {
		t.Errorf("a failed long stage printed %q", out)
	}
	buf.Reset()
	off := &progress{w: &buf, on: false, after: time.Millisecond}
	off.begin("compile")
	time.Sleep(10 * time.Millisecond)
	off.end(true)
	if buf.Len() != 0 {
		t.Errorf("progress printed while off: %q", buf.String())
	}
}

// TestStageTitles checks that every stage the pipeline runs has a title
// for the progress line.
func TestStageTitles(t *testing.T) {
	for _, stage := range []string{"ground", "unfold", "cnf", "circuit", "answer", "count", "load", "save"} {
		if stageTitle(stage) == stage {
			t.Errorf("stage %s has no title", stage)
		}
	}
}
