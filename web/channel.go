package web

import "github.com/parley-elicit/parley/elicit"

// channelLabel names a channel for the facilitator: how a judgement they
// entered reached them.
func channelLabel(c elicit.Channel) string {
	switch c {
	case elicit.ChannelInPerson:
		return "said in the session (typed by me)"
	case elicit.ChannelPhone:
		return "by phone"
	case elicit.ChannelPaperForm:
		return "from a paper form"
	case elicit.ChannelMessage:
		return "by e-mail or message"
	case elicit.ChannelFile:
		return "from a spreadsheet file"
	}
	return string(c)
}

// channelForExpert says the same to the expert whose judgement it is.
func channelForExpert(c elicit.Channel) string {
	switch c {
	case elicit.ChannelInPerson:
		return "from what you said in the session"
	case elicit.ChannelPhone:
		return "from your call"
	case elicit.ChannelPaperForm:
		return "from your paper form"
	case elicit.ChannelMessage:
		return "from your e-mail or message"
	case elicit.ChannelFile:
		return "from a spreadsheet you sent"
	}
	return ""
}

// provenance is a revision's who-and-how for the facilitator's tables:
// "expert" or "facilitator, from a paper form".
func provenance(rv elicit.Revision) string {
	if rv.EnteredBy == elicit.ByFacilitator {
		return "facilitator, " + channelLabel(rv.Channel)
	}
	return "expert"
}
