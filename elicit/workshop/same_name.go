package workshop

import "strings"

// SameName reports whether two display names are the same person's by
// the rule a facilitator would apply at a glance: equal after trimming,
// folding case and collapsing inner spaces. The roster warns of a second
// expert of one name; an answer sheet finds an expert by it.
func SameName(a, b string) bool {
	norm := func(s string) string { return strings.Join(strings.Fields(strings.ToLower(s)), " ") }
	return norm(a) == norm(b)
}
