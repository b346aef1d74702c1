// Package workshop is the domain of an elicitation workshop: its
// questions, experts, revisions, Delphi rounds, weights, corrections and
// agreed priors, and the panel state of a question (PanelState) that the
// facilitator's panel, the round feedback and the record all read.
//
// It adapts its types to package elicit's mathematics, which takes plain
// values. It does no I/O.
package workshop
