package chart

import "testing"

// The fit table's second block, the fitted 5%, median and 95%, opens with
// a heading row that spans the table and names the block for screen
// readers (scope="rowgroup"), so its rows do not read as the stated rows
// printed twice.
func TestFitTableNamesItsPercentileBlock(t *testing.T) {
	d := sbeta(4.2, 17.9, 0, 1)
	// A 5/50/95 judgement: the block's rows repeat the stated rows'
	// probabilities, which is where an unlabelled block read as a bug.
	ns := parse(t, render(t, Fit(fitViewOf(d, Point{d.Quantile(0.05), 0.05}, Point{d.Quantile(0.5), 0.5}, Point{d.Quantile(0.95), 0.95}))))
	cols := 0
	for i, n := range ns {
		if n.Name == "thead" {
			for _, m := range ns[i+1:] {
				if m.Depth <= n.Depth {
					break
				}
				if m.Name == "th" {
					cols++
				}
			}
		}
	}
	var block []node
	for i, n := range ns {
		if n.Name == "tbody" && n.hasClass("chart-table-percentiles") {
			for _, m := range ns[i+1:] {
				if m.Depth <= n.Depth {
					break
				}
				if m.Name == "th" {
					block = append(block, m)
				}
			}
		}
	}
	if len(block) != 4 {
		t.Fatalf("percentile block has %d header cells, want a heading and 3 rows", len(block))
	}
	h := block[0]
	if h.Text != "Fitted 5%, median and 95%" || h.Attr["scope"] != "rowgroup" || h.Attr["colspan"] != "4" || cols != 4 {
		t.Errorf("block heading %q scope %q colspan %q (table has %d columns)", h.Text, h.Attr["scope"], h.Attr["colspan"], cols)
	}
	for i, want := range []string{"5%", "50% (median)", "95%"} {
		if block[i+1].Text != want || block[i+1].Attr["scope"] != "row" {
			t.Errorf("row %d header %q scope %q, want %q", i, block[i+1].Text, block[i+1].Attr["scope"], want)
		}
	}
}
