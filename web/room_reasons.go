package web

import (
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/parley-elicit/parley/web/chart"
)

// The room's reasons. Beside the picture the side column holds the
// median strip and, under it, what room is left: at 1280×720 a few lines.
// A large panel's reasons ran off the screen's foot there (20 reasons:
// only the heading showed at 1280×720, one reason cut in half at
// 1366×768, six and a half at 1920×1080), and nobody scrolls a projector.
// So the room lists the reasons beside the picture only when they fit
// there on the smallest projector; otherwise the side column says how
// many there are, with a link to the reasons display: the same room view
// (?show=reasons) with the reasons in three columns over the screen's
// width, in pages that each fit the screen ("Reasons 1–12 of 20", next
// and back), and back to the picture. Links, not script: the server lays
// the pages out.
//
// Whether text fits is estimated here, not measured: the server does not
// know the screen. Every size of the room's type is a share of the
// screen's width on a projector (style.css: 1.15vw, 1.3vw, …, above the
// clamps' floors, which bind only below 1231 px), so on a 16:9 projector
// (1280×720, 1366×768, 1920×1080) a column holds the same number of
// characters and a page the same number of lines at every size; a taller
// screen (16:10, 4:3) holds more: on a 1024×768 projector the type's
// floors bind and a column holds fewer words (19.6 of the type's ems),
// and the screen's height holds 48 ems, where 16:9 holds 43. Widths are DejaVu Sans's
// (chart.TextEm), what Chromium draws the room in on Debian and wider
// than the other fonts the stylesheet names, and each measure below is
// rounded down, so a font that sets the text a little wider still fits.
// TestReasonsDisplayFitsTheScreen (e2e) lays the pages out in Chromium at
// each projector size.

// Beside the picture (style.css .room-reasons, clamp(0.95rem, 1.15vw,
// 1.7rem), and the side column 9/25 of the width up to 1600 px): a line
// of at least 27.3 em at 1280 px, where the font's floor binds.
const (
	sideLineEm = 26
	// sideLines is what the side column holds under the median strip at
	// 1280×720 beside a panel of up to four experts (the strip's table of
	// three rows) and a wording of two lines: about five, read off the
	// invented demo's screenshot (its one reason's two lines and some 70
	// px under them), less one to spare.
	sideLines = 4
	// sideLinesQuartiles is the same under a strip of five experts or
	// more, whose table adds the quartiles (two rows, 64 px) and whose
	// legend takes a second line: none. Twenty experts' strip leaves room
	// for the line that counts the reasons and links to them, and not for
	// a heading over it too (13 px short).
	sideLinesQuartiles = 0
)

// The reasons display (style.css .room-reasons-page): type of 1.3vw, lines
// of 1.35 em, three columns in the 96vw between the margins with gaps of
// 2vw, so a column of 23.6 em; the screen's height, 56.25vw on 16:9, is
// 43.3 em. The header above the reasons (wording, state, fingerprint) and
// the heading and keys around them take the rest, estimated from their
// own text below.
const (
	pageColumns  = 3
	pageColumnEm = 23 // 23.6 em, less a margin
	pageLineEm   = 1.35
	pageScreenEm = 43.27
	// pageFixedEm is the page's parts that are the same on every room:
	// the invented banner, the workshop's line, the heading "Reasons 1–12
	// of 20" with its links, the keys at the foot, and the margins, in
	// the reasons' ems (8.8 em at 1280×720, read off a screenshot: the
	// list starting 190 px down, the keys' rule at 686 px), and one to
	// spare.
	pageFixedEm = 10
	// pageTypeVW is the reasons display's type, 1.3vw.
	pageTypeVW = 1.3
	// The header's own lines: the wording (wordingHeight) over 96vw; the
	// state and the fingerprint in 1.3vw type, lines of 1.5 em over 73.8
	// em.
	stateLineEm = 1.5
	stateWideEm = 96 / 1.3
)

// The wording's type. A question's wording can be long (a well-specified
// question defines its quantity, its population and its time), and every
// line of it in the title type (.room-question, 1.65vw, lines of 1.25
// em) comes off the side column's height: a panel of twenty under four
// lines of wording ran 21 px past the foot of a 1280×720 screen, under six
// lines 74 px. So a wording that takes more than three lines in the
// title type is set smaller, in the state line's type (1.3vw) while it
// takes at most three lines there, else in the side table's (1.05vw),
// the smallest type the room view uses: the header then takes no more
// height than three lines of the title type, up to about six lines'
// worth of text; a longer wording takes more.
var wordingSizes = [...]struct {
	vw    float64 // font size, in hundredths of the screen's width
	class string  // room.templ's class for it
}{{1.65, "room-question"}, {1.3, "room-question room-question-long"}, {1.05, "room-question room-question-longer"}}

const (
	// wordingLineHeight is .room-question's line height, in its ems.
	wordingLineHeight = 1.25
	// wordingMaxLines is the most lines of the title type a wording
	// takes before it is set smaller.
	wordingMaxLines = 3
)

// wordingType is how the room sets a wording (with its "Q1: "): its
// type (wordingSizes' index) and its lines there.
func wordingType(wording string) (size, lines int) {
	for i, t := range wordingSizes {
		lines = textLines(wording, 96/t.vw, 0, true)
		if i == len(wordingSizes)-1 || float64(lines)*t.vw <= wordingMaxLines*wordingSizes[0].vw {
			return i, lines
		}
	}
	return len(wordingSizes) - 1, lines
}

// wordingHeight is the wording's height in hundredths of the screen's
// width (vw), as wordingType sets it.
func wordingHeight(wording string) float64 {
	size, lines := wordingType(wording)
	return wordingSizes[size].vw * wordingLineHeight * float64(lines)
}

// textLines is how many lines text takes in a column wide ems wide, its
// first line starting lead ems in (after a label), words wrapped where
// the column ends, a word wider than the column broken (overflow-wrap:
// anywhere) and the text's own line breaks kept (white-space: pre-wrap).
func textLines(text string, wide, lead float64, bold bool) int {
	space := chart.TextEm(" ", bold)
	lines := 0
	for i, para := range strings.Split(text, "\n") {
		x := 0.0
		if i == 0 {
			x = lead
		}
		lines++
		for _, word := range strings.Split(para, " ") {
			w := chart.TextEm(word, bold)
			if x > 0 && x+space+w > wide {
				lines++
				x = 0
			}
			for w > wide {
				w -= wide
				lines++
			}
			if x > 0 {
				x += space
			}
			x += w
		}
	}
	return lines
}

// reasonLines is the lines one reason takes under its label ("Expert C:
// "), in a column wide ems wide.
func reasonLines(r feedbackReason, wide float64) int {
	return textLines(r.Reason, wide, chart.TextEm(r.Label+": ", true), false)
}

// reasonsBeside reports whether the reasons fit under the median strip
// of a panel of members experts on the smallest projector, with the
// question's wording as long as it is.
func reasonsBeside(reasons []feedbackReason, members int, wording string) bool {
	room := sideLines
	if members >= 5 {
		room = sideLinesQuartiles
	}
	// Each line of the title type's height that the wording takes past
	// two takes a line from the side.
	titleLine := wordingSizes[0].vw * wordingLineHeight
	room -= max(0, int(math.Ceil(wordingHeight(wording)/titleLine-2-1e-9)))
	lines := 0
	for _, r := range reasons {
		lines += reasonLines(r, sideLineEm)
	}
	return lines <= room
}

// sideLinesMost bounds the reasons a page carries for room.js to bring
// beside the picture on a screen larger than the smallest projector: as
// many lines of the side's width as a 1920×1200 screen's side holds under
// a strip of up to four experts, about a dozen, and more than that of a
// larger panel's. Reasons longer than that go to the reasons display on
// every screen, and the page does not carry them twice.
const sideLinesMost = 12

// reasonsMayBeside reports whether the reasons are short enough that a
// screen larger than the smallest projector may hold them beside the
// picture (room.js measures whether it does).
func reasonsMayBeside(reasons []feedbackReason) bool {
	lines := 0
	for _, r := range reasons {
		lines += reasonLines(r, sideLineEm)
	}
	return len(reasons) > 0 && lines <= sideLinesMost
}

// reasonPiece is a reason, or the part of one that fits a page, on the
// reasons display.
type reasonPiece struct {
	N     int // the reason's place among the reasons, from 1
	Label string
	Text  string
	Cont  bool // continues the reason from the page before
	More  bool // the reason continues on the next page
	// Long: the piece is longer than a column and runs on down the
	// next; every other piece is kept whole in one column.
	Long bool
}

// Named is the piece's label, "(continued)" after it on a page that
// carries on a reason from the page before.
func (p reasonPiece) Named() string {
	if p.Cont {
		return p.Label + " (continued)"
	}
	return p.Label
}

// Continues says, after the piece, that its reason goes on over the page.
func (p reasonPiece) Continues() string {
	if p.More {
		return " (continues on the next page)"
	}
	return ""
}

// reasonsScreen is one page of the reasons display, a screenful: the reasons (or
// parts) it shows, and their places from First to Last.
type reasonsScreen struct {
	Pieces      []reasonPiece
	First, Last int
}

// pageScreen is one projector's reasons display as the layout sees it:
// a column's width (Width, in the reasons' ems) and the lines one column
// holds under the room's header (Lines).
type pageScreen struct {
	Width, Lines float64
}

// pageScreens are the screens every page of reasons must fit at once:
// a 16:9 projector, where the type is a share of the width (pageLines),
// and a 1024×768 one, where the type's floors bind (pageLines4x3). A
// page laid out for one alone ran past the foot of the other: the 16:9
// columns hold 23 ems, the 1024×768 ones 19.6, and a page of 16:9 lines
// left the smaller screen a line and a half to spare, or less.
func pageScreens(header []string) []pageScreen {
	return []pageScreen{{pageColumnEm, pageLines(header)}, {pageColumnEm4x3, pageLines4x3(header)}}
}

// pageLines is how many lines of reasons one column of a page holds
// under the room's header on a 16:9 projector.
func pageLines(header []string) float64 {
	em := pageScreenEm - pageFixedEm
	for i, h := range header {
		if h == "" {
			continue
		}
		if i == 0 {
			em -= wordingHeight(h) / pageTypeVW
		} else {
			em -= stateLineEm * float64(textLines(h, stateWideEm, 0, false))
		}
	}
	return columnLines(em)
}

// The reasons display on a 1024×768 projector, where every type of the
// room is at its floor (style.css's clamps: 1.3vw is 13.3 px there,
// under the reasons' 1rem): the reasons in 16 px type, so the screen is
// 48 of their ems tall and 61.4 wide between the margins (96vw, 983 px),
// and a column is 19.6 ems (30.67vw, 314 px). The wording is set in its
// class's floor (1.2rem, 1rem or 0.9rem), the state and the fingerprint
// in 1rem. The page's fixed parts took 8.5 ems there in Chromium (the
// list starting 209 px down under a header of 130 px, the keys' rule at
// 742 px), so pageFixedEm's 10 holds for it too.
const (
	pageScreenEm4x3  = 48
	pageColumnEm4x3  = 19 // 19.6 em, less a margin
	pageStateWide4x3 = 61
)

// wordingFloorEm are the wording's sizes at their floors (style.css),
// in the reasons' ems (1rem), by wordingSizes' index.
var wordingFloorEm = [len(wordingSizes)]float64{1.2, 1, 0.9}

// pageLines4x3 is how many lines of reasons one column of a page holds
// under the room's header on a 1024×768 projector.
func pageLines4x3(header []string) float64 {
	em := float64(pageScreenEm4x3 - pageFixedEm)
	for i, h := range header {
		if h == "" {
			continue
		}
		if i == 0 {
			size, _ := wordingType(h)
			f := wordingFloorEm[size]
			em -= f * wordingLineHeight * float64(textLines(h, pageStateWide4x3/f, 0, true))
		} else {
			em -= stateLineEm * float64(textLines(h, pageStateWide4x3, 0, false))
		}
	}
	return columnLines(em)
}

// columnLines is the lines of reasons a column em ems tall holds.
func columnLines(em float64) float64 {
	perColumn := math.Floor(em / pageLineEm)
	// A column may end a line short of its foot, where the next reason's
	// first line does not fit under its label; and never hold less than
	// a few lines, however long the header.
	return max(4, perColumn-1)
}

// reasonGap is the space between two reasons, in lines (0.4 em).
const reasonGap = 0.4 / pageLineEm

// pagesOfReasons lays the reasons out in pages of pageColumns columns,
// in order, as the browser does, on every one of screens at once: a
// reason that fits a column is kept whole in one (style.css breaks none
// inside it, so that no reason's last lines stand unnamed at the top of
// the next column) and starts the next column where the rest of this one
// is too short; a reason longer than a column runs on down the next
// (Long); one longer than what is left of the page is cut at a word
// between pages and marked as continued. A page ends where the next
// reason would run past its foot on any of the screens.
func pagesOfReasons(reasons []feedbackReason, screens []pageScreen) []reasonsScreen {
	var pages []reasonsScreen
	var cur reasonsScreen
	// The column being filled on each screen, and its lines used.
	col, used := make([]int, len(screens)), make([]float64, len(screens))
	flush := func() {
		if len(cur.Pieces) > 0 {
			pages = append(pages, cur)
		}
		cur = reasonsScreen{}
		clear(col)
		clear(used)
	}
	// left is what the page holds from here on, down the columns.
	left := func(k int) float64 {
		return screens[k].Lines - used[k] + float64(pageColumns-1-col[k])*screens[k].Lines
	}
	add := func(p reasonPiece, n []float64) {
		if len(cur.Pieces) == 0 {
			cur.First = p.N
		}
		cur.Pieces = append(cur.Pieces, p)
		cur.Last = p.N
		for k, s := range screens {
			used[k] += n[k] + reasonGap
			for used[k] > s.Lines && col[k] < pageColumns-1 {
				used[k] -= s.Lines
				col[k]++
			}
		}
	}
	n := make([]float64, len(screens))
	for i, r := range reasons {
		p := reasonPiece{N: i + 1, Label: r.Label, Text: r.Reason}
		for {
			whole, inPage, onePage := true, true, true
			for k, s := range screens {
				n[k] = float64(reasonLines(feedbackReason{Label: p.Label, Reason: p.Text}, s.Width))
				whole = whole && n[k] <= s.Lines
				inPage = inPage && n[k] <= left(k)
				onePage = onePage && n[k] <= float64(pageColumns)*s.Lines
			}
			if whole {
				// Whole in one column on every screen: this one, or the
				// next.
				full := false
				for k, s := range screens {
					full = full || (used[k]+n[k] > s.Lines && used[k] > 0 && col[k] == pageColumns-1)
				}
				if full {
					flush()
					continue
				}
				for k, s := range screens {
					if used[k]+n[k] > s.Lines && used[k] > 0 {
						col[k], used[k] = col[k]+1, 0
					}
				}
				add(p, n)
				break
			}
			p.Long = true
			if inPage {
				add(p, n)
				break
			}
			if onePage && len(cur.Pieces) > 0 {
				// It fits a page of its own: start one.
				flush()
				continue
			}
			// Longer than a page: what fits of it here, on every screen,
			// the rest on the next.
			room := make([]float64, len(screens))
			short := false
			for k := range screens {
				room[k] = left(k)
				short = short || room[k] < 2
			}
			if short {
				flush()
				continue
			}
			head, tail := cutReason(p, screens, room)
			add(reasonPiece{N: p.N, Label: p.Label, Text: head, Cont: p.Cont, More: true, Long: true}, room)
			flush()
			p = reasonPiece{N: p.N, Label: p.Label, Text: tail, Cont: true}
		}
	}
	flush()
	return pages
}

// cutReason cuts p's text at the last space (or, in a word longer than
// the page, the last character) that keeps its first part within lines[k]
// lines on each screen k, and returns both parts.
func cutReason(p reasonPiece, screens []pageScreen, lines []float64) (string, string) {
	lead := chart.TextEm(p.Label+": ", true)
	fits := func(n int) bool {
		for k, s := range screens {
			if float64(textLines(p.Text[:n], s.Width, lead, false)) > lines[k] {
				return false
			}
		}
		return true
	}
	// The longest prefix that fits, by halves over its length in bytes,
	// then back to a character's start; at least one character.
	lo, hi := 0, len(p.Text)
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if fits(mid) {
			lo = mid
		} else {
			hi = mid
		}
	}
	for lo > 0 && !utf8.RuneStart(p.Text[lo]) {
		lo--
	}
	if lo == 0 {
		_, lo = utf8.DecodeRuneInString(p.Text)
	}
	cut := lo
	if sp := strings.LastIndexAny(p.Text[:lo], " \n"); sp > 0 {
		cut = sp
	}
	return strings.TrimRight(p.Text[:cut], " \n"), strings.TrimLeft(p.Text[cut:], " \n")
}

// reasonsRange is a page's heading: "Reasons 1–12 of 20", "Reason 5 of
// 20" (and "(continued)") where the page holds one reason or part of it.
func reasonsRange(p reasonsScreen, total int) string {
	of := " of " + strconv.Itoa(total)
	if p.First == p.Last {
		return "Reason " + strconv.Itoa(p.First) + of
	}
	return "Reasons " + strconv.Itoa(p.First) + "–" + strconv.Itoa(p.Last) + of
}

// besideWord is the side column's data-beside: where the server lays
// the reasons out for the smallest projector, "list" beside the picture
// or "link" to the reasons display; "" without reasons, and the page
// then writes no data-beside at all (room.js places only a side that
// has one).
func (v roomView) besideWord() string {
	switch {
	case len(v.Reasons) == 0:
		return ""
	case v.Beside:
		return "list"
	}
	return "link"
}
