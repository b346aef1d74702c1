// Package charttest reads web/chart's pictures back for tests in any
// package: what a reader of the SVG would see, not the drawing's model.
package charttest

import "regexp"

var (
	spreadIntervalsPath = regexp.MustCompile(`<path class="spread-intervals" d="([^"]*)"`)
	spreadMediansPath   = regexp.MustCompile(`<path class="spread-medians" d="([^"]*)"`)
	spreadSegment       = regexp.MustCompile(`M([^ ]+) ([^HMh]+)(?:H([^M]+)|h0)`)
)

// SpreadRows reads back the first strip in html (the wide layout), one
// entry per expert: x of the 5th percentile, x of the 95th, y, x of the
// median and the median dot's y, as drawn (chart.Spread). It is how the
// tests of the chart and of the pages that use Spread see its rows.
func SpreadRows(html string) [][5]string {
	iv, md := spreadIntervalsPath.FindStringSubmatch(html), spreadMediansPath.FindStringSubmatch(html)
	if iv == nil || md == nil {
		return nil
	}
	ivs, mds := spreadSegment.FindAllStringSubmatch(iv[1], -1), spreadSegment.FindAllStringSubmatch(md[1], -1)
	if len(ivs) != len(mds) {
		return nil
	}
	rows := make([][5]string, len(ivs))
	for i := range ivs {
		rows[i] = [5]string{ivs[i][1], ivs[i][3], ivs[i][2], mds[i][1], mds[i][2]}
	}
	return rows
}
