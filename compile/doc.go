// Package compile turns a tight ground program into a circuit on which every
// question trellis answers is one linear pass.
//
// Complete writes Clark's completion of the program as CNF (Fages 1994: for
// a tight program its models are exactly the stable models). Every auxiliary
// variable — rule bodies, counters for choice bounds, weight conditions for
// aggregates — is defined by an equivalence, so each stable model extends to
// exactly one model of the CNF and model counts are exact.
//
// Compile builds a smooth decision-DNNF circuit from the CNF top-down
// (Darwiche 2004; Huang and Darwiche 2007): unit propagation with watched
// literals, decomposition into independent components (AND nodes), decisions
// (deterministic OR nodes) in an order guided by a tree decomposition of the
// primal graph, a component cache and clause learning. Nodes live in flat
// arrays in children-first order and are hash-consed.
//
// Program runs both steps. Save, Load, Encode and Decode read and write the
// circuit file format (versioned, checksummed, written atomically), and Count
// counts the models of a circuit exactly.
package compile
