package scenarios

import (
	"fmt"
	"sort"
	"testing"

	"github.com/google/go-cmp/cmp"
)

// The checks in this file recompute every scenario's answers straight from
// its story, without the rule language: each enumerates every combination
// of options in plain Go, applies the rules one by one and adds up the
// penalties. They share nothing with the grounder, so they catch a wrong
// expected.json and a grounder that misreads a model alike.

// story is a configuration found by a story enumeration: its cost (highest
// priority first) and its shown atoms.
type story struct {
	cost  []int64
	atoms []string
}

// summarizeStories returns the optimum, the optimal configurations (shown
// atoms sorted) and the number of configurations.
func summarizeStories(configs []story) (best []int64, optimal [][]string, total int) {
	less := func(a, b []int64) bool {
		for i := range a {
			if a[i] != b[i] {
				return a[i] < b[i]
			}
		}
		return false
	}
	for _, c := range configs {
		if best == nil || less(c.cost, best) {
			best = c.cost
		}
	}
	for _, c := range configs {
		if !less(best, c.cost) {
			atoms := append([]string(nil), c.atoms...)
			sort.Strings(atoms)
			optimal = append(optimal, atoms)
		}
	}
	sortConfigs(optimal)
	return best, optimal, len(configs)
}

// subsets calls f with every subset of n items, as a bit mask.
func subsets(n int, f func(mask int)) {
	for m := 0; m < 1<<n; m++ {
		f(m)
	}
}

func networkStory() []story {
	type run struct {
		a, b string
		cost int64
	}
	runs := []run{{"lobby", "studio", 40}, {"lobby", "gallery", 35}, {"lobby", "cafe", 50}, {"studio", "gallery", 20},
		{"studio", "kiln", 10}, {"gallery", "kiln", 25}, {"gallery", "office", 30}, {"kiln", "office", 10}, {"cafe", "office", 30}}
	rooms := []string{"lobby", "studio", "gallery", "kiln", "cafe", "office"}
	var out []story
	subsets(len(runs), func(m int) {
		online := map[string]bool{"lobby": true}
		for changed := true; changed; {
			changed = false
			for i, r := range runs {
				if m&(1<<i) != 0 && online[r.a] != online[r.b] {
					online[r.a], online[r.b], changed = true, true, true
				}
			}
		}
		for _, r := range rooms {
			if !online[r] {
				return
			}
		}
		var price, kiln int64
		var atoms []string
		for i, r := range runs {
			if m&(1<<i) != 0 {
				price += r.cost
				if r.a == "kiln" || r.b == "kiln" {
					kiln++
				}
				atoms = append(atoms, fmt.Sprintf("buy(%s,%s)", r.a, r.b))
			}
		}
		if price > 200 { // the budget
			return
		}
		out = append(out, story{[]int64{kiln, price}, atoms})
	})
	return out
}

func bundleStory() []story {
	type item struct {
		name         string
		watts, price int64
	}
	projectors := []item{{"lamp_projector", 900, 120}, {"laser_projector", 400, 190}}
	sound := []item{{"big_speakers", 1200, 90}, {"small_speakers", 500, 70}}
	extras := []item{{"popcorn", 1000, 40}, {"lights", 300, 25}, {"heater", 1500, 35}}
	supplies := []item{{"small_generator", 2000, 60}, {"large_generator", 3500, 110}}
	var out []story
	for _, p := range projectors {
		for _, s := range sound {
			for _, g := range supplies {
				subsets(len(extras), func(m int) {
					kit := []item{p, s}
					for i, e := range extras {
						if m&(1<<i) != 0 {
							kit = append(kit, e)
						}
					}
					var watts, price int64
					has := map[string]bool{}
					atoms := []string{"generator(" + g.name + ")"}
					for _, it := range kit {
						watts += it.watts
						price += it.price
						has[it.name] = true
						atoms = append(atoms, "take("+it.name+")")
					}
					price += g.price
					if watts > g.watts || price > 330 { // the supply's power, the budget
						return
					}
					var wishes int64
					if !has["popcorn"] {
						wishes++
					}
					if !has["lights"] {
						wishes++
					}
					out = append(out, story{[]int64{wishes, price}, atoms})
				})
			}
		}
	}
	return out
}

func servicesStory() []story {
	offers := map[string][]string{
		"front":    {"front_basic", "front_plus"},
		"accounts": {"accounts_own", "accounts_hosted"},
		"stock":    {"stock_sheet", "stock_app"},
		"payments": {"pay_card", "pay_invoice"},
		"mail":     {"mail_relay"},
	}
	price := map[string]int64{"front_basic": 10, "front_plus": 25, "accounts_own": 12, "accounts_hosted": 20,
		"stock_sheet": 5, "stock_app": 15, "pay_card": 18, "pay_invoice": 8, "mail_relay": 6}
	needs := map[string][]string{
		"front_basic": {"accounts", "stock", "payments"}, "front_plus": {"stock", "payments"},
		"accounts_own": {"stock", "mail"}, "stock_app": {"accounts"}, "stock_sheet": {"mail"},
		"pay_card": {"accounts"}, "pay_invoice": {"accounts", "mail"}, "mail_relay": {"accounts"},
	}
	roles := []string{"accounts", "front", "mail", "payments", "stock"}
	var out []story
	var pick func(i int, use map[string]string)
	pick = func(i int, use map[string]string) {
		if i < len(roles) {
			for _, o := range append([]string{""}, offers[roles[i]]...) {
				use[roles[i]] = o
				pick(i+1, use)
			}
			return
		}
		// A role is down when nobody fills it or when its offering needs a
		// role that is down (the least such set).
		down := map[string]bool{}
		for _, r := range roles {
			down[r] = use[r] == ""
		}
		for changed := true; changed; {
			changed = false
			for _, r := range roles {
				if down[r] {
					continue
				}
				for _, q := range needs[use[r]] {
					if down[q] {
						down[r], changed = true, true
						break
					}
				}
			}
		}
		if down["front"] {
			return
		}
		var cost int64
		var atoms []string
		for _, r := range roles {
			if o := use[r]; o != "" {
				cost += price[o]
				atoms = append(atoms, fmt.Sprintf("use(%s,%s)", r, o))
			}
		}
		out = append(out, story{[]int64{cost}, atoms})
	}
	pick(0, map[string]string{})
	return out
}

func staffingStory() []story {
	people := []string{"ada", "bo", "cem", "dita"}
	firstAid := map[string]bool{"ada": true, "dita": true}
	shifts := []string{"sat_morning", "sat_evening", "sun_morning"}
	need := map[string]int{"sat_morning": 2, "sat_evening": 1, "sun_morning": 2}
	cannot := map[[2]string]bool{{"bo", "sat_morning"}: true, {"dita", "sun_morning"}: true}
	wishOff := map[[2]string]bool{{"ada", "sat_evening"}: true, {"cem", "sun_morning"}: true, {"dita", "sat_evening"}: true}
	travel := map[string]int64{"ada": 8, "bo": 3, "cem": 5, "dita": 6}
	var pairs [][2]string
	for _, p := range people {
		for _, s := range shifts {
			if !cannot[[2]string{p, s}] {
				pairs = append(pairs, [2]string{p, s})
			}
		}
	}
	var out []story
	subsets(len(pairs), func(m int) {
		count := map[string]int{}
		covered := map[string]bool{}
		load := map[string]int{}
		var wishes, money int64
		var atoms []string
		for i, ps := range pairs {
			if m&(1<<i) == 0 {
				continue
			}
			p, s := ps[0], ps[1]
			count[s]++
			load[p]++
			covered[s] = covered[s] || firstAid[p]
			if wishOff[ps] {
				wishes++
			}
			money += travel[p]
			atoms = append(atoms, fmt.Sprintf("work(%s,%s)", p, s))
		}
		for _, s := range shifts {
			if count[s] < need[s] || !covered[s] {
				return
			}
		}
		for _, p := range people {
			if load[p] > 2 {
				return
			}
		}
		out = append(out, story{[]int64{wishes, money}, atoms})
	})
	return out
}

// TestExpectedByStory checks expected.json against the story enumerations.
func TestExpectedByStory(t *testing.T) {
	stories := map[string]func() []story{
		"network":  networkStory,
		"bundle":   bundleStory,
		"services": servicesStory,
		"staffing": staffingStory,
	}
	for _, name := range Names() {
		t.Run(name, func(t *testing.T) {
			f, ok := stories[name]
			if !ok {
				t.Fatalf("no story enumeration for scenario %s; write one", name)
			}
			want, err := Answers(name)
			if err != nil {
				t.Fatal(err)
			}
			best, optimal, total := summarizeStories(f())
			if fmt.Sprint(total) != want.Total {
				t.Errorf("%d configurations by the story, expected.json says %s", total, want.Total)
			}
			if fmt.Sprint(len(optimal)) != want.Ties {
				t.Errorf("%d tied optima by the story, expected.json says %s", len(optimal), want.Ties)
			}
			var values []int64
			for _, c := range want.Optimum {
				values = append(values, c.Value)
			}
			if diff := cmp.Diff(values, best); diff != "" {
				t.Errorf("optimum differs (-expected.json +story):\n%s", diff)
			}
			exp := append([][]string(nil), want.Optimal...)
			for _, e := range exp {
				sort.Strings(e)
			}
			sortConfigs(exp)
			if diff := cmp.Diff(exp, optimal); diff != "" {
				t.Errorf("optimal configurations differ (-expected.json +story):\n%s", diff)
			}
		})
	}
}
