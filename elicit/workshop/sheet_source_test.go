package workshop

import (
	"testing"
	"time"
)

// Each judgement from an answer sheet finds its file and row: by the IDs
// the event names, or, in an older record, by the event's time.
func TestSheetSources(t *testing.T) {
	at := time.Date(2026, 12, 3, 4, 28, 39, 827055000, time.UTC)
	revs := []Revision{
		{ID: 5, At: at.Add(-time.Minute), EnteredBy: ByExpert},
		{ID: 8, At: at, EnteredBy: ByFacilitator, Channel: ChannelPaperForm},
		{ID: 7, At: at, EnteredBy: ByFacilitator, Channel: ChannelPaperForm},
		{ID: 9, At: at, EnteredBy: ByExpert}, // an expert's save in the same instant is no row
		{ID: 12, At: at.Add(time.Hour), EnteredBy: ByFacilitator, Channel: ChannelFile},
		{ID: 13, At: at.Add(time.Hour), EnteredBy: ByFacilitator, Channel: ChannelFile},
	}
	events := []Event{
		{ID: 1, Kind: EventAnswersImported, At: at, Detail: `{"sha256":"aa","name":"old.csv","rows":[2,4],"channel":"paper_form"}`},
		{ID: 2, Kind: EventAnswersImported, At: at.Add(time.Hour), Detail: `{"sha256":"bb","rows":[3,2],"channel":"file","revisions":[12,13]}`},
		{ID: 3, Kind: EventAnswersImported, At: at.Add(2 * time.Hour), Detail: `{"sha256":"cc","rows":[2],"channel":"file"}`}, // no revisions of its time
		{Kind: EventRoundClosed, At: at},
	}
	got := SheetSources(events, revs)
	want := map[int64]SheetSource{
		7:  {Name: "old.csv", SHA256: "aa", Row: 2, Event: 1},
		8:  {Name: "old.csv", SHA256: "aa", Row: 4, Event: 1},
		12: {SHA256: "bb", Row: 3, Event: 2},
		13: {SHA256: "bb", Row: 2, Event: 2},
	}
	if len(got) != len(want) {
		t.Fatalf("SheetSources = %v, want %v", got, want)
	}
	for id, w := range want {
		if got[id] != w {
			t.Errorf("revision %d: %+v, want %+v", id, got[id], w)
		}
	}
}
