package record

import (
	"errors"
	"fmt"

	"github.com/parley-elicit/parley/elicit"
)

// inputErr is an *elicit.InputError for field with a formatted detail.
func inputErr(field string, rule elicit.Rule, format string, args ...any) *elicit.InputError {
	return &elicit.InputError{Field: field, Rule: rule, Detail: fmt.Sprintf(format, args...)}
}

// under puts an elicit.InputError's field below a path in the document, so
// "values[1]" from a fit becomes "revisions[3].answer.values[1]". Other
// errors are returned as they are.
func under(path string, err error) error {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err
	}
	return &elicit.InputError{Field: path + "." + ie.Field, Rule: ie.Rule, Detail: ie.Detail}
}
