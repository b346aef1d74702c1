package chart

import (
	"regexp"
	"strings"
	"testing"
)

// hasCell says whether html has a table cell that reads text, whatever
// the cell's attributes.
func hasCell(html, text string) bool {
	return regexp.MustCompile(`<td[^>]*>` + regexp.QuoteMeta(text) + `</td>`).MatchString(html)
}

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
	if h.Text != "The curve's 5%, middle (median) and 95% points" || h.Attr["scope"] != "rowgroup" || h.Attr["colspan"] != "4" || cols != 4 {
		t.Errorf("block heading %q scope %q colspan %q (table has %d columns)", h.Text, h.Attr["scope"], h.Attr["colspan"], cols)
	}
	for i, want := range []string{"5%", "50% (median)", "95%"} {
		if block[i+1].Text != want || block[i+1].Attr["scope"] != "row" {
			t.Errorf("row %d header %q scope %q, want %q", i, block[i+1].Text, block[i+1].Attr["scope"], want)
		}
	}
}

// On a phone the fit's table and the table of each curve's percentiles
// are blocks of labelled lines (chart.css writes each cell's data-label
// before its number): every number of the stated rows and of the curves
// carries the name of its column, as its header writes it, whoever's
// judgement it is.
func TestChartTablesLabelEachNumberWithItsColumn(t *testing.T) {
	d := sbeta(3, 20000, 0, 1)
	pts := []Point{{0.00002, 0.05}, {0.00005, 0.5}, {0.00012, 0.95}}
	mine := fitViewOf(d, pts...)
	theirs := fitViewOf(d, pts...)
	theirs.Whose = "Priya Raman"
	panel := PanelView{ID: "p", Quantity: "q", Lower: 0, Upper: 1, Curves: []Curve{
		{Label: "Expert A", Role: RoleExpert, Dist: d}, {Label: "Pool", Role: RolePool, Dist: sbeta(3, 25000, 0, 1)}}}
	for _, c := range []struct {
		name   string
		html   string
		labels []string // of the columns, "" where a cell carries none
		rows   int
	}{
		{"the expert's fit", render(t, Fit(mine)), []string{"chance below", "you said", "the curve says", "the curve's chance below yours"}, 3},
		{"the fit entered for an expert", render(t, Fit(theirs)), []string{"chance below", "Priya Raman said", "the curve says", "the curve's chance below that"}, 3},
		{"the panel", render(t, Panel(panel)), []string{"", "", "5%", "median", "95%"}, 2},
	} {
		ns := parse(t, c.html)
		table := find(ns, "table", "chart-table")
		if len(table) != 1 {
			t.Fatalf("%s: %d tables", c.name, len(table))
		}
		var heads []string
		var rows [][]node
		inHead, inRows := false, false
		for _, n := range ns {
			switch {
			case n.Name == "thead":
				inHead, inRows = true, false
			case n.Name == "tbody":
				inHead, inRows = false, !n.hasClass("chart-table-percentiles")
			case n.Name == "th" && inHead:
				heads = append(heads, strings.TrimSpace(n.Text))
			case n.Name == "tr" && inRows:
				rows = append(rows, nil)
			case (n.Name == "td" || n.Name == "th") && inRows && len(rows) > 0:
				rows[len(rows)-1] = append(rows[len(rows)-1], n)
			}
		}
		if len(rows) != c.rows {
			t.Errorf("%s: %d rows, want %d", c.name, len(rows), c.rows)
		}
		for _, r := range rows {
			if len(r) != len(heads) || len(r) != len(c.labels) {
				t.Errorf("%s: a row of %d cells under %d headers %q", c.name, len(r), len(heads), heads)
				continue
			}
			for i, cell := range r {
				if got := cell.Attr["data-label"]; got != c.labels[i] || (got != "" && got != heads[i]) {
					t.Errorf("%s: the cell %q under %q is labelled %q, want %q", c.name, strings.TrimSpace(cell.Text), heads[i], got, c.labels[i])
				}
			}
		}
	}
}
