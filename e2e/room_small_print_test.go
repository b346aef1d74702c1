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
}

const readRoomSmallPrint = `(() => {
	const px = e => parseFloat(getComputedStyle(e).fontSize);
	const lines = e => {
		const s = getComputedStyle(e);
		return (e.getBoundingClientRect().height - parseFloat(s.paddingTop) - parseFloat(s.paddingBottom) - parseFloat(s.borderTopWidth) - parseFloat(s.borderBottomWidth)) / parseFloat(s.lineHeight);
	};
	const keys = document.querySelector(".room-keys"), banner = document.querySelector(".banner-invented");
	const letter = Array.from(document.querySelectorAll(".room-side .chart-medians svg .median-label")).find(e => e.getClientRects().length > 0);
	const svg = letter && letter.closest("svg");
	return {keys: px(keys), banner: px(banner), bannerLines: lines(banner), keysLines: lines(keys),
		medianLetter: letter ? px(letter) * svg.getBoundingClientRect().width / svg.viewBox.baseVal.width : 0};
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
func TestRoomSmallPrintReadsOnAProjector(t *testing.T) {
	_, _, fac, room := demoRoomAfterRoundOne(t)
	shots := newScreenshots(t)
	for _, st := range []struct{ name, query string }{{"picture", ""}, {"prior", "?show=prior"}, {"reasons", "?show=reasons&page=1"}} {
		for _, sz := range [][2]int64{{1024, 768}, {1366, 768}, {1920, 1080}} {
			fac.viewport(sz[0], sz[1], false)
			fac.open(room + st.query)
			got := eval[roomSmallPrint](fac, "the room's small print", readRoomSmallPrint)
			t.Logf("the %s at %d×%d: keys %.1f px (%.2f lines), banner %.1f px (%.2f lines), median letters %.1f px", st.name, sz[0], sz[1], got.Keys, got.KeysLines, got.Banner, got.BannerLines, got.MedianLetter)
			// Read from the back of a room: at least 14 px on a 1024×768
			// projector, 16 px at 1366×768 and 20 px at 1920×1080
			// (common practice for projected small print, no source).
			least := map[int64]float64{1024: 14, 1366: 16, 1920: 20}[sz[0]]
			if got.Keys < least-0.05 || got.Banner < least-0.05 {
				t.Errorf("the %s at %d×%d: the keys' hint in %.1f px, the banner in %.1f px; want at least %.0f", st.name, sz[0], sz[1], got.Keys, got.Banner, least)
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
