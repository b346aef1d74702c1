package workshop

import "encoding/json"

// DefinitionFields are the JSON names of what a question asks and how its
// answers are read and scored: its question_added event carries them
// (Definition), and each later change has its own event (question_edited,
// calibration_background_set, truth_revealed), so a record can be
// checked for a question changed without one (record's
// CheckDefinitions).
var DefinitionFields = []string{"wording", "quantity", "units", "lower", "upper", "format", "probs", "bin_edges",
	"chips", "calibration", "log_uniform_background"}

// Fields is the JSON object of q's named fields by their JSON names, a
// field left out of q's JSON (its zero value) as null.
func (q Question) Fields(names []string) json.RawMessage {
	var all map[string]json.RawMessage
	b, _ := json.Marshal(q)
	_ = json.Unmarshal(b, &all)
	out := map[string]json.RawMessage{}
	for _, f := range names {
		if v, ok := all[f]; ok {
			out[f] = v
		} else {
			out[f] = json.RawMessage("null")
		}
	}
	b, _ = json.Marshal(out)
	return b
}

// Definition is the detail of q's question_added event: its
// DefinitionFields, and its true value when it is added revealed (a
// hidden one stays out of the record until its reveal).
func (q Question) Definition() json.RawMessage {
	names := DefinitionFields
	if q.Revealed {
		names = append(names[:len(names):len(names)], "true_value")
	}
	return q.Fields(names)
}
