// Package elicit is the mathematics of expert elicitation for a bounded
// quantity: Beta distributions, least-squares fits to quantile judgements,
// linear and logarithmic opinion pools, conjugate updating, quick
// constructions of a prior, study planning, and Cooke's classical model.
//
// Every function takes plain values (numbers, slices, string keys) and
// states its formula and reference in its doc comment. The workshop that
// gathers the judgements is package workshop; the export record is package
// record. It does no I/O and imports nothing else of Parley.
package elicit
