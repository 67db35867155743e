// # Grounding
//
// Ground turns a model into a Program in five steps.
//
//  1. Load: parse the file and, recursively, the files it includes
//     (relative to the including file, each file once, cycles are errors);
//     collect parameters and apply command-line overrides; warn about
//     predicates used with several arities; reject recursion through an
//     aggregate on the predicate dependency graph.
//  2. Compile: every statement becomes internal rules whose terms refer to
//     variable slots. `not p(X, _)` becomes `not #notN(X)` with the rule
//     `#notN(X) if p(X, Y)`. A choice becomes a rule for its body and one per
//     element (body plus `for` literals). For each positive body literal a
//     join plan is made that reads that literal from the delta and orders
//     the others greedily (most bound arguments first, comparisons and
//     negative literals as soon as their variables are bound), with a hash
//     index on the bound argument positions. Unbound variables are errors.
//  3. Fixpoint: semi-naive evaluation over an over-approximation of the
//     true atoms: every rule head and choice element is possible, negative
//     literals and aggregates never block. Each round joins one literal
//     against the atoms new in the last round, earlier literals against older
//     atoms and later ones against older and new atoms, so every instance is
//     found exactly once. Instances are recorded as flat records of
//     integers in fixed-size chunks; atoms are interned in an open-addressing
//     table over flat records. Aggregate conditions are then grounded over
//     the possible atoms: one element per distinct tuple.
//  4. Settle: unit propagation computes the certain atoms (bodies of
//     certain positive atoms, impossible negative atoms and certainly true
//     aggregates), then the possible atoms again from the instances that can
//     still hold; this alternates until the possible atoms stop shrinking
//     (the alternating fixpoint of the well-founded semantics, Van Gelder
//     1993, bounded to a few rounds). A stratified program without choices
//     ends up as facts.
//  5. Build: certain atoms become facts; certain positive and impossible
//     negative literals are dropped; instances with an impossible positive
//     or a certain negative literal are dropped, and so are rules repeated
//     after simplification (never penalties); decided aggregates vanish;
//     `for` conditions must be decided; penalties get their atoms; shown
//     atoms are sorted in term order.
//
// The limit Options.MaxRules bounds the number of instances; the error
// names the statement with the most. Terms nest at most MaxTermDepth deep.
package ground
