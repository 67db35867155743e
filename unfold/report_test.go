package unfold

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"

	"trellis/ground"
)

func TestReportTextAndJSON(t *testing.T) {
	s := gridShape(2, 4)
	p := s.program()
	q, rep, err := Unfold(context.Background(), p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Components) != 1 {
		t.Fatalf("%d components, want 1", len(rep.Components))
	}
	c := rep.Components[0]
	if c.Size != 8 || c.Edges != 20 || c.First != "v(0)" {
		t.Fatalf("component report %+v", c)
	}
	made := 0
	for _, a := range q.Atoms {
		if a.Copy != ground.NoAtom {
			made++
		}
	}
	if rep.AtomsAfter != len(q.Atoms) || rep.TotalCopies != made {
		t.Fatalf("totals %+v for %d atoms after", rep, len(q.Atoms))
	}
	// The width of a ladder is 2 (a path decomposition by pairs of
	// rungs, textbook); min-fill finds it.
	if rep.WidthBefore != 2 || c.WidthBefore != 2 {
		t.Fatalf("width before %d, component %d, want 2", rep.WidthBefore, c.WidthBefore)
	}
	if rep.WidthAfter < rep.WidthBefore {
		t.Fatalf("width after %d below width before %d", rep.WidthAfter, rep.WidthBefore)
	}
	var text bytes.Buffer
	if err := rep.WriteText(&text); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"8 atoms", "1 cyclic component\n", string(c.Construction), "v(0)", "estimated treewidth"} {
		if !strings.Contains(text.String(), want) {
			t.Errorf("text report lacks %q:\n%s", want, text.String())
		}
	}
	var js bytes.Buffer
	if err := rep.WriteJSON(&js); err != nil {
		t.Fatal(err)
	}
	var back Report
	if err := json.Unmarshal(js.Bytes(), &back); err != nil {
		t.Fatal(err)
	}
	if back.TotalCopies != rep.TotalCopies || len(back.Components) != 1 || back.Components[0].Construction != c.Construction {
		t.Fatalf("JSON round trip lost data: %s", js.String())
	}
}

func TestWriteDot(t *testing.T) {
	p := &ground.Program{}
	a := p.AddAtom("a", nil)
	b := p.AddAtom("b", nil)
	c := p.AddAtom("c", []ground.Term{p.Terms.String("x y")})
	p.Rules = []ground.Rule{{Head: a, Pos: []ground.Atom{b}}, {Head: b, Pos: []ground.Atom{a}}, {Head: c, Pos: []ground.Atom{a}}}
	var out bytes.Buffer
	if err := WriteDot(&out, p, NewGraph(p)); err != nil {
		t.Fatal(err)
	}
	dot := out.String()
	for _, want := range []string{"digraph", "cluster_", "fillcolor", "a0 -> a1;", "a1 -> a0;", "a0 -> a2;", `label="c(\"x y\")"`} {
		if !strings.Contains(dot, want) {
			t.Errorf("dot output lacks %q:\n%s", want, dot)
		}
	}
	if strings.Count(dot, "fillcolor") != 2 {
		t.Errorf("want the two cycle atoms coloured:\n%s", dot)
	}
}

// TestWidthKnownGraphs checks the width estimate on graphs of known
// treewidth (textbook values): a path 1, a cycle 2, a complete graph on k
// vertices k−1, a k×k grid k (min-fill finds these exactly).
func TestWidthKnownGraphs(t *testing.T) {
	for _, tc := range []struct {
		s    *shape
		want int
	}{
		{biPathShape(10), 1},
		{cycleShape(10), 2},
		{completeShape(6), 5},
		{gridShape(3, 3), 3},
		{gridShape(4, 4), 4},
	} {
		for _, limit := range []int{1000, 1} { // min-fill, then min-degree
			got, method := Width(tc.s.program(), nil, limit)
			if got != tc.want {
				t.Errorf("%s: %s width %d, want %d", tc.s.name, method, got, tc.want)
			}
		}
	}
}
