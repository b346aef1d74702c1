package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/record"
)

func init() {
	command("fingerprint", "list a JSON record's fingerprint at each round's close and now, or look for a noted one (--in, --check, --strict)", runFingerprint)
}

// runFingerprint recomputes the chain of a record's facts (package
// fingerprint) and lists the fingerprint at each round's close and of the
// whole record; with --check it says whether a value noted in the room
// is one of the chain's values. Exit 0: listed, or found; 1: not found,
// or the record's own chain disagrees with its facts (with --check, only
// under --strict); 2: bad input.
func runFingerprint(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("fingerprint", stderr)
	in := fs.String("in", "", "JSON record `file` (as parley export writes it), or - for standard input")
	check := fs.String("check", "", "a noted `fingerprint`: 16 hex digits as the room was shown them (\"3f2a 91c0 7be4 0d15\") or all 64")
	strict := fs.Bool("strict", false, "with --check, exit 1 when the value is found but the record disagrees with its facts (otherwise that is said on stderr and the exit is 0)")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	var noted []byte
	if *check != "" {
		var err error
		if noted, err = fingerprint.ParseNoted("--check", *check); err != nil {
			return fail(stderr, "fingerprint", err)
		}
	}
	var r io.Reader = stdin
	switch *in {
	case "":
		return fail(stderr, "fingerprint", badInput("in", "a JSON record file is required"))
	case "-":
	default:
		f, err := os.Open(*in)
		if err != nil {
			return fail(stderr, "fingerprint", badInput("in", "%v", err))
		}
		defer f.Close()
		r = f
	}
	// Only the facts matter here: the record is read strictly, but not
	// validated as an import would (a changed answer can break its fit's
	// check, and this command must still say the fingerprint changed).
	rec, err := record.Decode(r)
	if err != nil {
		return fail(stderr, "fingerprint", err)
	}
	// A record of another format may lay its facts out otherwise: its
	// values were worked out as if it were this one's.
	if err := rec.CheckFormat(); err != nil {
		return fail(stderr, "fingerprint", err)
	}
	// Any JSON object decodes; one without a workshop is not a record
	// (its "fingerprint" would be h₀ of workshop 0).
	if rec.Workshop.ID <= 0 || rec.Workshop.Created.IsZero() {
		return fail(stderr, "fingerprint", badInput("in", "the file is not a workshop's record: it has no workshop.id and workshop.created"))
	}
	// A record narrowed to one question leaves the workshop's other
	// facts out: its values are no fingerprint of the workshop, and a
	// value noted in the room was said to show the record changed.
	if q := rec.OneQuestion; q != 0 {
		return fail(stderr, "fingerprint", badInput("in", "the file holds question id %d alone (a question's export, parley export --question): it leaves the workshop's other facts out, so its fingerprints are not the workshop's; export the whole record (without --question) and check that", q))
	}
	c := fingerprint.Of(rec.Facts())
	// The record's own chain, if it carries one, against its facts.
	var own error
	if err := rec.CheckChain(); err != nil {
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Rule != record.RuleChainMismatch {
			return fail(stderr, "fingerprint", err)
		}
		own = err
	}
	// The questions' own rows, which are not chained, against their
	// chained events: a question changed without an event is reported
	// as the chain's disagreement is.
	disagrees := "the file's own chain disagrees with its facts"
	if own == nil {
		if own = rec.CheckDefinitions(); own != nil {
			disagrees = "a question, an expert or a withheld reason is not what its events in the decision log give"
		}
	}
	// An answer saved in a round is chained before that round's close:
	// one after it was added behind Parley's back, and leaves the values
	// noted at the close as they were.
	if own == nil {
		if own = rec.CheckRounds(); own != nil {
			disagrees = "an answer comes after its round closed (it was added later)"
		}
	}
	// A weight set, an agreed prior or a batch of study data is written
	// with its entry in the decision log.
	if own == nil {
		if own = rec.CheckLogged(); own != nil {
			disagrees = "a decision is in the record without its entry in the decision log (it was added later)"
		}
	}
	// The weights in force and each question's agreed_prior, the
	// record's headline numbers, are copies of their histories' last,
	// which the chain covers.
	if own == nil {
		if own = rec.CheckInForce(); own != nil {
			disagrees = "the weights or an agreed prior in force are not the last of their history"
		}
	}
	w := rec.Workshop
	fmt.Fprintf(stdout, "Workshop %d, %q: record fingerprints (the first 64 bits of each value)\n", w.ID, w.Title)
	if noted == nil {
		for _, l := range c.RoundCloses() {
			fmt.Fprintf(stdout, "after round %d closed (%s): %s\n", l.Closed, when(l), l.Value.Short())
		}
		fmt.Fprintf(stdout, "now, after all %d facts: %s (in full %s)\n", len(c.Links), c.Head().Short(), c.Head().Hex())
		if own != nil {
			fmt.Fprintf(stderr, "parley fingerprint: %s: %s\n", disagrees, errText(own))
			return exitFailure
		}
		return exitOK
	}
	i, found := c.Find(noted)
	if !found {
		msg := fmt.Sprintf("%s is not a fingerprint of this record at any point: either the record was changed after the value was noted, or the value was noted from another workshop's record", shortOf(noted))
		if own != nil {
			msg += fmt.Sprintf("; also, %s: %s", disagrees, errText(own))
		}
		return fail(stderr, "fingerprint", errors.New(msg))
	}
	if i < 0 {
		fmt.Fprintf(stdout, "%s matches the workshop's start, before anything was recorded: it says nothing about the answers.\n", shortOf(noted))
	} else {
		l := c.Links[i]
		fmt.Fprintf(stdout, "%s matches the record's fingerprint after %s, at %s (fact %d of %d). The record up to there is as it was when the value was noted.\n",
			shortOf(noted), factWords(l), when(l), i+1, len(c.Links))
	}
	if own != nil {
		fmt.Fprintf(stderr, "parley fingerprint: but %s: %s\n", disagrees, errText(own))
		if *strict {
			// A script that trusts the exit status alone read such a
			// record as sound.
			return exitFailure
		}
	}
	return exitOK
}

// when is a fact's time as the decision log writes it.
func when(l fingerprint.Link) string { return l.At.UTC().Format("2006-01-02 15:04:05 UTC") }

// factWords names a fact of the chain in words.
func factWords(l fingerprint.Link) string {
	id := strconv.FormatInt(l.ID, 10)
	switch {
	case l.Closed > 0:
		return "round " + strconv.Itoa(l.Closed) + " closed, event " + id
	case l.Kind == fingerprint.KindRevision:
		return "revision " + id
	case l.Kind == fingerprint.KindWeightSet:
		return "weight set " + id
	case l.Kind == fingerprint.KindAgreedPrior:
		return "agreed prior " + id
	case l.Kind == fingerprint.KindStudyData:
		return "study data batch " + id
	}
	return "event " + id
}

// shortOf writes a noted value's bytes in groups of 4 hex digits.
func shortOf(b []byte) string {
	h := fmt.Sprintf("%x", b)
	out := ""
	for i := 0; i < len(h); i += 4 {
		if i > 0 {
			out += " "
		}
		out += h[i:min(i+4, len(h))]
	}
	return out
}
