package web

import (
	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/web/chart"
)

// picture is a question's picture for the facilitator and the report:
// every pooled expert's curve overlaid with the pool and the agreed prior
// while the panel is small enough to tell the curves apart, and beyond
// overlayLimit experts the pool and the agreed prior over a strip of the
// experts' 90% intervals (chart.Spread), the picture the experts
// themselves see for a large panel. Exactly one of the two is set, or
// neither when there is nothing to draw.
type picture struct {
	Panel  *chart.PanelView
	Spread *chart.SpreadView
}

// panelPicture chooses the picture for the experts' fits dists (labelled
// by names) and the summary curves (the pool, the agreed prior), which
// are drawn in either case.
func panelPicture(frame chart.PanelView, names []string, dists []elicit.ScaledBeta, summary []chart.Curve) picture {
	if len(dists) > overlayLimit {
		return picture{Spread: &chart.SpreadView{ID: frame.ID, Quantity: frame.Quantity, Units: frame.Units,
			Lower: frame.Lower, Upper: frame.Upper, Curves: summary, Others: dists, WholePanel: true, Truth: frame.Truth}}
	}
	v := frame
	if len(dists) == 1 && len(summary) > 0 && summary[0].Role == chart.RolePool {
		// A pool of one is that expert's curve: drawn after it, its thick
		// line hid the expert's, whose legend named a line nobody could
		// find. The expert is drawn above it, as the room view draws them.
		v.Curves = append(v.Curves, summary[0])
		summary = summary[1:]
	}
	for i, d := range dists {
		v.Curves = append(v.Curves, chart.Curve{Label: names[i], Role: chart.RoleExpert, Dist: d})
	}
	v.Curves = append(v.Curves, summary...)
	if len(v.Curves) == 0 {
		return picture{}
	}
	return picture{Panel: &v}
}

// large says the picture is the strip of a large panel.
func (p picture) large() bool { return p.Spread != nil }
