package grammar_test

import (
	"errors"
	"fmt"

	"trellis/grammar"
)

func ExampleParseFile() {
	src := []byte("lamp(1..3).\nchoose at most 2 of on(L) for lamp(L).\npenalty 1 if lamp(L), not on(L).\n")
	f, err := grammar.ParseFile("lamps.trl", src)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range f.Statements {
		fmt.Printf("%s: %T\n", s.Position(), s)
	}
	// Output:
	// lamps.trl:1:1: *grammar.Fact
	// lamps.trl:2:1: *grammar.Choice
	// lamps.trl:3:1: *grammar.Penalty
}

func ExampleFormat() {
	f, _ := grammar.ParseFile("", []byte("lit(L)if lamp( L ),not off(L).  # why\nforbid count(L:lit(L))>2."))
	fmt.Print(string(grammar.Format(f)))
	// Output:
	// lit(L) if lamp(L), not off(L). # why
	// forbid count(L : lit(L)) > 2.
}

func ExampleErrorList_Render() {
	src := []byte("lamp(1..3).\nchoose any on(L) for lamp(L).\nlit(L) if on(L)\n")
	_, err := grammar.ParseFile("lamps.trl", src)
	var list grammar.ErrorList
	if errors.As(err, &list) {
		fmt.Print(list.Render(src))
	}
	// Output:
	// lamps.trl:2:12: expected `of` after the choice bound, found the name `on`
	// choose any on(L) for lamp(L).
	//            ^
	// lamps.trl:3:16: expected a period to end the rule
	// lit(L) if on(L)
	//                ^
}
