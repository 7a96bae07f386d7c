// Package report renders plan results as pictures: SVG charts now, HTML and
// PNG later. It writes to an io.Writer, never prints and knows nothing of
// the command line.
//
// Units: inputs are SI (metres); a chart shows kilometres and metres, or
// miles and feet when asked for imperial units. Distances along a path are
// measured from its first point; heights are metres above sea level.
package report
