// Package chart draws Parley's pictures as server-rendered SVG templ
// components: one expert's fitted Beta against their stated points (Fit),
// several curves overlaid (Panel), and calibration scores beside weights
// (Scores). It is the one plotting path of the web layer.
//
// The package evaluates the densities and distribution functions it is
// given on a grid and maps them to pixels; it computes no statistics of its
// own. Every coordinate it writes is finite: densities that are infinite
// at a bound are cut at the top of the plot and the caption says so.
// Styling lives in web/static/chart.css and in SVG presentation
// attributes, never in inline style attributes.
package chart
