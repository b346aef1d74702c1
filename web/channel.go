package web

import (
	"context"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// channelLabel names a channel for the facilitator: how a judgement they
// entered reached them.
func channelLabel(c workshop.Channel) string {
	switch c {
	case workshop.ChannelInPerson:
		return "said in the session (typed by me)"
	case workshop.ChannelPhone:
		return "by phone"
	case workshop.ChannelPaperForm:
		return "from a paper form"
	case workshop.ChannelMessage:
		return "by e-mail or message"
	case workshop.ChannelFile:
		return "from a spreadsheet file"
	}
	return string(c)
}

// channelForExpert says the same to the expert whose judgement it is.
func channelForExpert(c workshop.Channel) string {
	switch c {
	case workshop.ChannelInPerson:
		return "from what you said in the session"
	case workshop.ChannelPhone:
		return "from your call"
	case workshop.ChannelPaperForm:
		return "from your paper form"
	case workshop.ChannelMessage:
		return "from your e-mail or message"
	case workshop.ChannelFile:
		return "from a spreadsheet you sent"
	}
	return ""
}

// channelRecorded is how a judgement reached the facilitator, as the
// record says it after "entered by the facilitator" or "by you": the
// choice's own label speaks as the facilitator choosing ("typed by me"),
// which the report's reader would take for themselves.
func channelRecorded(c workshop.Channel) string {
	if c == workshop.ChannelInPerson {
		return "from what was said in the session"
	}
	return channelLabel(c)
}

// provenance is a revision's who-and-how for the facilitator's tables:
// "expert" or "facilitator, from a paper form".
func provenance(rv workshop.Revision) string {
	if rv.EnteredBy == workshop.ByFacilitator {
		return "facilitator, " + channelRecorded(rv.Channel)
	}
	return "expert"
}

// provenanceFrom is provenance with, for a judgement imported from an
// answer sheet, the file and row it came from: "facilitator, from a
// paper form (answer sheet answers.csv, row 3)". Without the row, a
// reviewer could not tell which file of several, or which row of it,
// the judgement was read from.
func provenanceFrom(rv workshop.Revision, sheets map[int64]workshop.SheetSource) string {
	p := provenance(rv)
	if src, ok := sheets[rv.ID]; ok && rv.EnteredBy == workshop.ByFacilitator {
		p += " (" + sheetRowLabel(src) + ")"
	}
	return p
}

// sheetRowLabel names a sheet's row: "answer sheet answers.csv, row 3",
// or, for a sheet pasted into the form or read from standard input,
// "an answer sheet without a file name, row 3".
func sheetRowLabel(src workshop.SheetSource) string {
	sheet := "an answer sheet without a file name"
	if src.Name != "" {
		sheet = "answer sheet " + src.Name
	}
	return sheet + ", row " + strconv.Itoa(src.Row)
}

// sheetSources reads which of a workshop's judgements came from which
// answer sheet and row (workshop.SheetSources). all are the workshop's
// revisions when the caller has them; otherwise they are read when an
// older record's events need them.
func (s *Server) sheetSources(ctx context.Context, wsID int64, all []workshop.Revision) (map[int64]workshop.SheetSource, error) {
	evs, err := s.store.Events(ctx, wsID)
	if err != nil {
		return nil, err
	}
	if all == nil {
		for _, ev := range evs {
			if ev.Kind == workshop.EventAnswersImported && !strings.Contains(ev.Detail, `"revisions"`) {
				if all, err = s.store.Revisions(ctx, wsID); err != nil {
					return nil, err
				}
				break
			}
		}
	}
	return workshop.SheetSources(evs, all), nil
}
