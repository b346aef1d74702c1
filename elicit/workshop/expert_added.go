package workshop

import "encoding/json"

// ExpertAdded is the detail of an expert_added event: the expert's id and
// the name, affiliation and expertise they were added with, which no
// correction changes, so that a record can be checked for an expert
// renamed without an event (record's CheckDefinitions). Events recorded
// before it carried the name carry the id alone (Name nil).
type ExpertAdded struct {
	ExpertID    int64   `json:"expert_id"`
	Name        *string `json:"name,omitempty"`
	Affiliation string  `json:"affiliation,omitempty"`
	Expertise   string  `json:"expertise,omitempty"`
}

// AddedDetail is the detail of e's expert_added event.
func (e Expert) AddedDetail() string {
	name := e.Name
	b, _ := json.Marshal(ExpertAdded{ExpertID: e.ID, Name: &name, Affiliation: e.Affiliation, Expertise: e.Expertise})
	return string(b)
}
