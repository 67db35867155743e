package compile

import (
	"math/big"
	"math/bits"
)

// Count returns the number of models of c over its variables 1..NumVars. It
// relies on c being smooth and deterministic: a FreeNode counts 2, an
// AndNode the product and an OrNode the sum of its children. Counts are
// computed in 64 bits while they fit and with big integers beyond.
func Count(c *Circuit) *big.Int {
	if len(c.Kind) == 0 {
		return new(big.Int)
	}
	if n, ok := countSmall(c); ok {
		return new(big.Int).SetUint64(n)
	}
	return countBig(c)
}

// countSmall counts in 64 bits; it reports false on overflow.
func countSmall(c *Circuit) (uint64, bool) {
	val := make([]uint64, len(c.Kind))
	for i, k := range c.Kind {
		kids := c.Children[c.Start[i]:c.Start[i+1]]
		switch k {
		case FalseNode:
			val[i] = 0
		case TrueNode, LitNode:
			val[i] = 1
		case FreeNode:
			val[i] = 2
		case AndNode:
			p := uint64(1)
			for _, x := range kids {
				hi, lo := bits.Mul64(p, val[x])
				if hi != 0 {
					return 0, false
				}
				p = lo
			}
			val[i] = p
		case OrNode:
			var s uint64
			for _, x := range kids {
				var carry uint64
				s, carry = bits.Add64(s, val[x], 0)
				if carry != 0 {
					return 0, false
				}
			}
			val[i] = s
		}
	}
	return val[c.Root], true
}

func countBig(c *Circuit) *big.Int {
	val := make([]*big.Int, len(c.Kind))
	zero, one, two := big.NewInt(0), big.NewInt(1), big.NewInt(2)
	for i, k := range c.Kind {
		kids := c.Children[c.Start[i]:c.Start[i+1]]
		switch k {
		case FalseNode:
			val[i] = zero
		case TrueNode, LitNode:
			val[i] = one
		case FreeNode:
			val[i] = two
		case AndNode:
			p := big.NewInt(1)
			for _, x := range kids {
				p.Mul(p, val[x])
			}
			val[i] = p
		case OrNode:
			s := new(big.Int)
			for _, x := range kids {
				s.Add(s, val[x])
			}
			val[i] = s
		default:
			val[i] = zero
		}
	}
	return new(big.Int).Set(val[c.Root])
}
