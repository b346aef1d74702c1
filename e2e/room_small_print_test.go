package e2e

import (
	"fmt"
	"testing"
)

// roomSmallPrint is the room view's least type a projector must read: the
// keys' hint at the foot and the banner that the data are invented, in
// px, and the banner's lines.
type roomSmallPrint struct {
	Keys         float64 `json:"keys"`
	Banner       float64 `json:"banner"`
	BannerLines  float64 `json:"bannerLines"`
	KeysLines    float64 `json:"keysLines"`
	MedianLetter float64 `json:"medianLetter"` // the median strip's letters, 0 where none is drawn
	StripTick    float64 `json:"stripTick"`    // the median strip's tick labels, 0 where none is drawn
	Tick         float64 `json:"tick"`         // the picture's tick labels (x and y, the least), 0 where none is drawn
	Fingerprint  float64 `json:"fingerprint"`  // the note after the record's fingerprint, 0 where there is none
}

const readRoomSmallPrint = `(() => {
	const px = e => parseFloat(getComputedStyle(e).fontSize);
	const lines = e => {
		const s = getComputedStyle(e);
		return (e.getBoundingClientRect().height - parseFloat(s.paddingTop) - parseFloat(s.paddingBottom) - parseFloat(s.borderTopWidth) - parseFloat(s.borderBottomWidth)) / parseFloat(s.lineHeight);
	};
	const keys = document.querySelector(".room-keys"), banner = document.querySelector(".banner-invented");
	const shown = e => e.getClientRects().length > 0;
	// A picture's text as drawn on the screen: its font scaled as its
	// picture is.
	const drawn = e => px(e) * e.closest("svg").getBoundingClientRect().width / e.closest("svg").viewBox.baseVal.width;
	const least = es => es.length ? Math.min(...es.map(drawn)) : 0;
	const letter = Array.from(document.querySelectorAll(".room-side .chart-medians svg .median-label")).find(shown);
	const note = document.querySelector(".room-fingerprint-note");
	return {keys: px(keys), banner: px(banner), bannerLines: lines(banner), keysLines: lines(keys),
		medianLetter: letter ? drawn(letter) : 0,
		stripTick: least(Array.from(document.querySelectorAll(".room-side .chart-medians svg.chart-svg")).filter(shown).flatMap(s => Array.from(s.querySelectorAll(".tick-label")))),
		tick: least(Array.from(document.querySelectorAll(".room-chart svg.chart-svg")).filter(shown).flatMap(s => Array.from(s.querySelectorAll(".tick-label")))),
		fingerprint: note ? px(note) : 0};
})()`

// TestRoomSmallPrintReadsOnAProjector: at 1920×1080 the keys' hint at the
// room view's foot read at 16.9 px and the banner that the workshop is
// invented at 17.3 px, under every other word on the screen; at 1366×768
// 12.0 and 12.8 px, at 1024×768 11.5 and 12.8 px. They are now at least
// 20 px at 1920×1080 (the smallest type the room uses, 1.05vw), 16 px at
// 1366×768 and 14 px at 1024×768, on the picture, the prior display and
// the reasons display, each on one line; the median strip's letters keep
// their 18 px (their size is the strip's own); and every state still fits
// its screen without scrolling, the header's first line one line.
// At 1024×768 the picture's tick labels read at 11.2 px (the picture is
// drawn at three quarters of its size there), the median strip's letters
// at 13 px and its tick labels at 12, and the note after the record's
// fingerprint at 13.6 px: each is now at least 14 px at every projector
// size (1280×1024 too), with no part of the view and no two words of a
// picture over one another.
func TestRoomSmallPrintReadsOnAProjector(t *testing.T) {
	_, _, fac, room := demoRoomAfterRoundOne(t)
	shots := newScreenshots(t)
	for _, st := range []struct{ name, query string }{{"picture", ""}, {"prior", "?show=prior"}, {"reasons", "?show=reasons&page=1"}} {
		for _, sz := range [][2]int64{{1024, 768}, {1280, 1024}, {1366, 768}, {1920, 1080}} {
			fac.viewport(sz[0], sz[1], false)
			fac.open(room + st.query)
			got := eval[roomSmallPrint](fac, "the room's small print", readRoomSmallPrint)
			t.Logf("the %s at %d×%d: keys %.1f px (%.2f lines), banner %.1f px (%.2f lines), median letters %.1f px, strip ticks %.1f px, picture ticks %.1f px, fingerprint note %.1f px",
				st.name, sz[0], sz[1], got.Keys, got.KeysLines, got.Banner, got.BannerLines, got.MedianLetter, got.StripTick, got.Tick, got.Fingerprint)
			// Read from the back of a room: at least 14 px on a 1024×768
			// projector, 16 px at 1366×768 and 20 px at 1920×1080
			// (common practice for projected small print, no source).
			least := map[int64]float64{1024: 14, 1280: 14, 1366: 16, 1920: 20}[sz[0]]
			if got.Keys < least-0.05 || got.Banner < least-0.05 {
				t.Errorf("the %s at %d×%d: the keys' hint in %.1f px, the banner in %.1f px; want at least %.0f", st.name, sz[0], sz[1], got.Keys, got.Banner, least)
			}
			// The picture's and the strip's small print and the
			// fingerprint's note: at least 14 px wherever they are drawn
			// (common practice for projected small print, no source).
			for _, p := range []struct {
				what string
				px   float64
			}{{"the median strip's letters", got.MedianLetter}, {"the median strip's tick labels", got.StripTick},
				{"the picture's tick labels", got.Tick}, {"the fingerprint's note", got.Fingerprint}} {
				if p.px > 0 && p.px < 13.95 {
					t.Errorf("the %s at %d×%d: %s in %.1f px, want at least 14", st.name, sz[0], sz[1], p.what, p.px)
				}
			}
			if got.Fingerprint == 0 || (st.name != "reasons" && got.Tick == 0) || (st.name == "picture" && (got.MedianLetter == 0 || got.StripTick == 0)) {
				t.Errorf("the %s at %d×%d: no small print found to measure: %+v", st.name, sz[0], sz[1], got)
			}
			if st.name != "reasons" {
				if over := overlappingParts(fac); len(over) > 0 {
					t.Errorf("the %s at %d×%d: the room view draws parts over one another: %q", st.name, sz[0], sz[1], over)
				}
				if over := overlappingWords(fac); len(over) > 0 {
					t.Errorf("the %s at %d×%d: the room's pictures draw words over one another or outside themselves: %q", st.name, sz[0], sz[1], over)
				}
			}
			if sz[0] == 1920 {
				if st.name == "picture" && (got.MedianLetter < 17.5 || got.MedianLetter > 18.5) {
					t.Errorf("the picture at 1920×1080: the median strip's letters at %.1f px, want their 18", got.MedianLetter)
				}
			}
			if got.BannerLines > 1.2 || got.KeysLines > 1.2 {
				t.Errorf("the %s at %d×%d: the banner takes %.2f lines, the keys' hint %.2f; want one each", st.name, sz[0], sz[1], got.BannerLines, got.KeysLines)
			}
			if w := eval[roomWhere](fac, "the first line", readRoomWhere); w.Lines > 1.2 {
				t.Errorf("the %s at %d×%d: the header's first line takes %.2f lines", st.name, sz[0], sz[1], w.Lines)
			}
			if st.name == "reasons" {
				// No picture here: the page itself is the screen.
				if sw, sh := eval[int](fac, "page width", `document.documentElement.scrollWidth`), eval[int](fac, "page height", `document.documentElement.scrollHeight`); sw > int(sz[0]) || sh > int(sz[1]) {
					t.Errorf("the reasons at %d×%d: the page is %d×%d px", sz[0], sz[1], sw, sh)
				}
			} else {
				fitsScreen(t, fac, int(sz[0]), int(sz[1]))
			}
			shots.take(fac, fmt.Sprintf("room-small-print-%s-%d", st.name, sz[0]))
		}
	}
}
