package optimize

import (
	"fmt"
	"sort"
	"strings"
	"unicode"

	"trellis/compile"
)

// nameIndex finds atoms by their printed names.
type nameIndex struct {
	atoms []compile.NamedVar
	index map[string]int // normalised name → first atom with it
}

func newNameIndex(atoms []compile.NamedVar) *nameIndex {
	x := &nameIndex{atoms: atoms, index: make(map[string]int, len(atoms))}
	for i, a := range atoms {
		k := normalizeName(a.Name)
		if _, dup := x.index[k]; !dup {
			x.index[k] = i
		}
	}
	return x
}

// normalizeName drops the white space outside string literals.
func normalizeName(s string) string {
	var b strings.Builder
	inString, escaped := false, false
	for _, r := range s {
		switch {
		case inString:
			b.WriteRune(r)
			switch {
			case escaped:
				escaped = false
			case r == '\\':
				escaped = true
			case r == '"':
				inString = false
			}
		case r == '"':
			inString = true
			b.WriteRune(r)
		case unicode.IsSpace(r):
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// pin resolves "atom", "not atom" or "-atom".
func (x *nameIndex) pin(s string) (Pin, error) {
	name := strings.TrimSpace(s)
	value := true
	if rest, ok := strings.CutPrefix(name, "-"); ok {
		name, value = strings.TrimSpace(rest), false
	} else if rest, ok := strings.CutPrefix(name, "not"); ok && rest != "" && unicode.IsSpace([]rune(rest)[0]) {
		name, value = strings.TrimSpace(rest), false
	}
	i, err := x.lookup(name)
	if err != nil {
		return Pin{}, err
	}
	return Pin{Var: x.atoms[i].Var, Value: value}, nil
}

// lookup returns the index of the atom printed as name.
func (x *nameIndex) lookup(name string) (int, error) {
	k := normalizeName(name)
	if i, ok := x.index[k]; ok {
		return i, nil
	}
	if k == "" {
		return 0, fmt.Errorf("cannot pin an empty atom name")
	}
	close := x.closeNames(k, 5)
	if len(close) == 0 {
		return 0, fmt.Errorf("unknown atom %q (no atom has a similar name)", name)
	}
	return 0, fmt.Errorf("unknown atom %q; close names: %s", name, strings.Join(close, ", "))
}

// closeNames lists up to max atom names within a small edit distance of k,
// closest first, then in term order.
func (x *nameIndex) closeNames(k string, max int) []string {
	limit := len(k)/3 + 1
	type hit struct{ d, i int }
	var hits []hit
	pred, _, _ := strings.Cut(k, "(")
	for i, a := range x.atoms {
		n := normalizeName(a.Name)
		d := editDistance(k, n, limit)
		if d > limit {
			// same predicate, different arguments: still worth showing
			if p, _, _ := strings.Cut(n, "("); p == pred {
				d = limit + 1
			} else {
				continue
			}
		}
		hits = append(hits, hit{d, i})
	}
	sort.SliceStable(hits, func(a, b int) bool { return hits[a].d < hits[b].d })
	var out []string
	seen := map[string]bool{}
	for _, h := range hits {
		n := x.atoms[h.i].Name
		if seen[n] {
			continue
		}
		seen[n] = true
		out = append(out, n)
		if len(out) == max {
			break
		}
	}
	return out
}

// editDistance is the Levenshtein distance of a and b, or a value above
// limit when it exceeds limit.
func editDistance(a, b string, limit int) int {
	if d := len(a) - len(b); d > limit || -d > limit {
		return limit + 1
	}
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		rowMin := cur[0]
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			rowMin = min(rowMin, cur[j])
		}
		if rowMin > limit {
			return limit + 1
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
