package chart

// Role says what a curve stands for; it decides the line's style.
type Role int

// The roles a curve can play.
const (
	RoleExpert     Role = iota // one expert's fitted Beta
	RolePool                   // the pooled distribution (a mixture)
	RoleAgreed                 // the prior the panel agreed
	RoleConsensus              // a Beta fitted to a judgement the group agreed
	RoleLikelihood             // the data's likelihood, scaled to a density
	RolePosterior              // the prior updated with the data
)

func (r Role) String() string {
	switch r {
	case RoleExpert:
		return "expert"
	case RolePool:
		return "pool"
	case RoleAgreed:
		return "agreed"
	case RoleConsensus:
		return "consensus"
	case RoleLikelihood:
		return "likelihood"
	case RolePosterior:
		return "posterior"
	}
	return "curve"
}

// lineStyle is how one curve is stroked. Curves differ in dash pattern
// and width as well as hue, so they stay apart in grey-scale print and for
// viewers with any colour-vision deficiency.
type lineStyle struct {
	Stroke string // hex colour
	Width  string // stroke-width in pixels
	Dash   string // stroke-dasharray; "" for solid
	Name   string // the pattern in words, for the table and captions
}

// expertHues are taken from the Okabe–Ito set (Okabe & Ito 2008, "Color
// Universal Design"), which keeps hues apart for protan, deutan and tritan
// viewers. The yellow (#F0E442) is left out: it is unreadable on white.
// Order alternates dark and light so neighbours also differ in luminance:
//
//	#0072B2 blue, #E69F00 orange, #009E73 bluish green,
//	#CC79A7 reddish purple, #56B4E9 sky blue, #D55E00 vermillion.
var expertHues = []string{"#0072B2", "#E69F00", "#009E73", "#CC79A7", "#56B4E9", "#D55E00"}

// expertDashes cycle with a period (5) coprime to the hues' (6), so
// the first 30 experts each get a distinct hue-and-pattern pair and
// consecutive experts always differ in both.
var expertDashes = []struct{ Dash, Name string }{
	{"", "solid"},
	{"7 4", "dashed"},
	{"1.5 3", "dotted"},
	{"9 3 2 3", "dash-dot"},
	{"15 5", "long-dashed"},
}

// styleFor returns the style of the i-th curve of the given role. The
// pool and the agreed prior are near-black and thick so they read first.
func styleFor(r Role, i int) lineStyle {
	switch r {
	case RolePool:
		return lineStyle{Stroke: "#1B1B1B", Width: "3.5", Name: "thick solid"}
	case RoleAgreed:
		return lineStyle{Stroke: "#1B1B1B", Width: "3.5", Dash: "11 5", Name: "thick dashed"}
	case RoleConsensus:
		return lineStyle{Stroke: "#5A5A5A", Width: "3", Dash: "11 4 2 4", Name: "thick dash-dot"}
	case RoleLikelihood:
		return lineStyle{Stroke: "#D55E00", Width: "2.5", Dash: "1.5 3", Name: "dotted"}
	case RolePosterior:
		return lineStyle{Stroke: "#0072B2", Width: "3.5", Name: "thick solid"}
	}
	d := expertDashes[i%len(expertDashes)]
	return lineStyle{Stroke: expertHues[i%len(expertHues)], Width: "2", Dash: d.Dash, Name: d.Name}
}
