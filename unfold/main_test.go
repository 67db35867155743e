package unfold

import (
	"flag"
	"os"
	"testing"
)

// TestMain runs the property tests with 1000 random cases each (rapid's
// default is 100), unless -rapid.checks is given or -short is set.
func TestMain(m *testing.M) {
	flag.Parse()
	set := false
	flag.Visit(func(f *flag.Flag) {
		if f.Name == "rapid.checks" {
			set = true
		}
	})
	if !set && !testing.Short() {
		flag.Set("rapid.checks", "1000")
	}
	os.Exit(m.Run())
}
