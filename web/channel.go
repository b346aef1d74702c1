package web

import "github.com/parley-elicit/parley/elicit/workshop"

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
