// Package elicit is Parley's statistical and workshop domain: Beta
// distributions, fitting experts' quantile judgements, opinion pools,
// conjugate updating, calibration scoring, and the workshop's own types
// (questions, experts, revisions, rounds, events). It does no I/O.
package elicit
