package chart

import (
	"bytes"
	"context"
	"encoding/xml"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/a-h/templ"
)

// node is one element of rendered output, flattened, for structural checks.
type node struct {
	Name  string
	Attr  map[string]string
	Text  string
	Depth int
}

func (n node) hasClass(c string) bool {
	for _, f := range strings.Fields(n.Attr["class"]) {
		if f == c {
			return true
		}
	}
	return false
}

func (n node) num(t *testing.T, attr string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(n.Attr[attr], 64)
	if err != nil {
		t.Fatalf("<%s %s=%q>: %v", n.Name, attr, n.Attr[attr], err)
	}
	return v
}

// render draws c with only its wide layout, the one the structural
// tests read; renderLayout keeps the named layout instead.
func render(t *testing.T, c templ.Component) string {
	t.Helper()
	return renderLayout(t, c, "wide")
}

// renderLayout draws c and keeps, of its pictures, only those drawn in
// the named layout ("wide" or "compact").
func renderLayout(t *testing.T, c templ.Component, keep string) string {
	t.Helper()
	var b bytes.Buffer
	if err := c.Render(context.Background(), &b); err != nil {
		t.Fatalf("render: %v", err)
	}
	drop := "compact"
	if keep == "compact" {
		drop = "wide"
	}
	return regexp.MustCompile(`(?s)<svg class="chart-svg[^"]* chart-`+drop+`".*?</svg>`).ReplaceAllString(b.String(), "")
}

// drawing is the first picture of html (renderLayout's) in the layout
// lay, parsed, with its viewBox's width and height.
func drawing(t *testing.T, html, lay string) ([]node, float64, float64) {
	t.Helper()
	pic := regexp.MustCompile(`(?s)<svg class="chart-svg[^"]*chart-` + lay + `".*?</svg>`).FindString(html)
	ns := parse(t, pic)
	vb := strings.Fields(find(ns, "svg", "chart-"+lay)[0].Attr["viewBox"])
	w, _ := strconv.ParseFloat(vb[2], 64)
	h, _ := strconv.ParseFloat(vb[3], 64)
	return ns, w, h
}

// parse reads rendered HTML as XML (templ writes every element closed and
// every attribute quoted) and fails the test if it is not well formed.
func parse(t *testing.T, html string) []node {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(html))
	d.Entity = xml.HTMLEntity
	d.AutoClose = xml.HTMLAutoClose
	d.Strict = false
	var out []node
	var stack []int
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("output is not well formed: %v", err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			n := node{Name: e.Name.Local, Attr: map[string]string{}, Depth: len(stack)}
			for _, a := range e.Attr {
				n.Attr[a.Name.Local] = a.Value
			}
			out = append(out, n)
			stack = append(stack, len(out)-1)
		case xml.EndElement:
			if len(stack) > 0 {
				stack = stack[:len(stack)-1]
			}
		case xml.CharData:
			if len(stack) > 0 {
				out[stack[len(stack)-1]].Text += string(e)
			}
		}
	}
	return out
}

func find(ns []node, name, class string) []node {
	var out []node
	for _, n := range ns {
		if n.Name == name && (class == "" || n.hasClass(class)) {
			out = append(out, n)
		}
	}
	return out
}

var pathNumber = regexp.MustCompile(`-?[0-9.]+(e-?[0-9]+)?|[A-Za-z]+`)

// checkFinite fails when the output has NaN or Inf anywhere, or a path
// coordinate outside the SVG's viewBox.
func checkFinite(t *testing.T, html string) {
	t.Helper()
	// CSP is style-src 'self': no inline style attribute or element.
	if strings.Contains(html, " style=") || strings.Contains(html, "<style") {
		t.Error("output carries inline style")
	}
	for _, bad := range []string{"NaN", "Inf", "not available"} {
		if strings.Contains(html, bad) {
			t.Errorf("output contains %q", bad)
		}
	}
	ns := parse(t, html)
	for _, svg := range find(ns, "svg", "chart-svg") {
		f := strings.Fields(svg.Attr["viewBox"])
		w, _ := strconv.ParseFloat(f[2], 64)
		h, _ := strconv.ParseFloat(f[3], 64)
		for _, p := range find(ns, "path", "") {
			for i, tok := range pathNumber.FindAllString(p.Attr["d"], -1) {
				if tok == "M" || tok == "L" || tok == "C" || tok == "S" || tok == "Z" || tok == "H" || tok == "h" {
					continue
				}
				v, err := strconv.ParseFloat(tok, 64)
				if err != nil || math.IsNaN(v) || v < 0 || v > math.Max(w, h) {
					t.Fatalf("path %q: token %d %q outside the picture", p.Attr["data-label"], i, tok)
				}
			}
		}
	}
}

// axisMap recovers the data→pixel map of an axis from two of its ticks, so
// tests check drawn positions against the labels a reader sees.
func axisMap(t *testing.T, ts []node, posAttr string, value func(string) float64) func(float64) float64 {
	t.Helper()
	if len(ts) < 2 {
		t.Fatalf("need two ticks, got %d", len(ts))
	}
	a, b := ts[0], ts[len(ts)-1]
	va, vb := value(a.Attr["data-value"]), value(b.Attr["data-value"])
	pa, pb := a.num(t, posAttr), b.num(t, posAttr)
	return func(v float64) float64 { return pa + (v-va)/(vb-va)*(pb-pa) }
}

func parseNumber(s string) float64 {
	v, _ := strconv.ParseFloat(s, 64)
	return v
}

func parsePercent(s string) float64 {
	v, _ := strconv.ParseFloat(strings.TrimSuffix(s, "%"), 64)
	return v / 100
}
