package workshop

import "encoding/json"

// TextFields are the JSON names of a workshop's own text: what its
// workshop_created event carries (CreatedDetail) and each
// workshop_edited event changes, so that a record can be checked for a
// workshop's text changed without an event (record's CheckDefinitions).
var TextFields = []string{"title", "purpose", "decision", "notes"}

// CreatedDetail is the detail of w's workshop_created event: its text as
// it was created. Events recorded before it carried the text have none.
func (w Workshop) CreatedDetail() string {
	b, _ := json.Marshal(map[string]string{"title": w.Title, "purpose": w.Purpose, "decision": w.Decision, "notes": w.Notes})
	return string(b)
}
