package web

// Exported forms of this package's strict number parsers, so the command
// line (cmd/parley) applies the very same rule as the forms.

// ParseNumber parses raw as a finite plain decimal number for the named
// field, by the rule of every number field in a form (see
// parseFloatField): no NaN, Inf, hex, underscores or separators.
func ParseNumber(field, raw string) (float64, error) { return parseFloatField(field, raw) }

// ParseNumberList parses numbers separated by spaces, commas or
// semicolons, each by ParseNumber's rule; item i is reported as field[i].
func ParseNumberList(field, raw string) ([]float64, error) { return parseFloatList(field, raw) }

// ParseWholeNumber parses raw as a whole number in [min, max].
func ParseWholeNumber(field, raw string, min, max int) (int, error) {
	return parseIntField(field, raw, min, max)
}
