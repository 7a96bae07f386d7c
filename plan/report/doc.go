// Package report renders plan results as pictures: charts as SVG (vector,
// for the web and further editing) and PNG (raster, for printing and
// documents), HTML later. Both renderers of a chart draw one layout
// computed in one place. It writes to an io.Writer, never prints and knows
// nothing of the command line.
//
// Units: inputs are SI (metres); a chart shows kilometres and metres, or
// miles and feet when asked for imperial units. Distances along a path are
// measured from its first point; heights are metres above sea level.
package report
