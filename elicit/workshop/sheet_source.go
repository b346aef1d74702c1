package workshop

import (
	"encoding/json"
	"sort"
)

// SheetSource is where a judgement imported from an answer sheet came
// from: the file's name (empty for a pasted sheet), its SHA-256 and the
// judgement's row in it, as a spreadsheet numbers rows.
type SheetSource struct {
	Name   string
	SHA256 string
	Row    int
	// Event is the ID of the sheet's EventAnswersImported event.
	Event int64
}

// SheetSources finds, for each revision that came from an answer sheet,
// the sheet and row it came from, by the workshop's EventAnswersImported
// events. An event names its revisions (SheetImport.Revisions); an older
// one is matched to the facilitator's revisions saved at its time, in the
// order saved, as they were written in one transaction.
func SheetSources(events []Event, revisions []Revision) map[int64]SheetSource {
	var out map[int64]SheetSource
	var byTime map[int64][]Revision // unix nanoseconds → revisions, by ID
	for _, ev := range events {
		if ev.Kind != EventAnswersImported {
			continue
		}
		var imp SheetImport
		if json.Unmarshal([]byte(ev.Detail), &imp) != nil {
			continue
		}
		ids := imp.Revisions
		if len(ids) == 0 {
			if byTime == nil {
				byTime = map[int64][]Revision{}
				for _, rv := range revisions {
					if rv.EnteredBy == ByFacilitator {
						byTime[rv.At.UnixNano()] = append(byTime[rv.At.UnixNano()], rv)
					}
				}
				for _, rs := range byTime {
					sort.Slice(rs, func(i, j int) bool { return rs[i].ID < rs[j].ID })
				}
			}
			for _, rv := range byTime[ev.At.UnixNano()] {
				ids = append(ids, rv.ID)
			}
		}
		if len(ids) != len(imp.Rows) {
			continue // not this sheet's judgements: say nothing rather than the wrong row
		}
		if out == nil {
			out = map[int64]SheetSource{}
		}
		for i, id := range ids {
			out[id] = SheetSource{Name: imp.Name, SHA256: imp.SHA256, Row: imp.Rows[i], Event: ev.ID}
		}
	}
	return out
}
