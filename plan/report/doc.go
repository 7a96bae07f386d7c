// Package report renders plan results as pictures: charts as SVG (vector,
// for the web and further editing) and PNG (raster, for printing and
// documents), maps as PNG, coverage as KMZ ground overlays and GeoJSON
// polygons, HTML later. Both renderers of a chart draw one layout computed
// in one place. It writes to an io.Writer, never prints and knows nothing
// of the command line.
//
// Units: inputs are SI (metres); a chart shows kilometres and metres, or
// miles and feet when asked for imperial units. Distances along a path are
// measured from its first point; heights are metres above sea level.
//
// Maps: positions are orb.Point (longitude, latitude in degrees, WGS84);
// grids (Grid) are float32 rasters in longitude and latitude stored row by
// row from the north, their Bounds the outer edges of the cells. A map is
// equirectangular, true to scale at its middle latitude, north up; its base
// is a shaded relief of the terrain (Hillshade: Horn's slopes, lit from the
// north-west at 45°), values are drawn in discrete bands of viridis (Scale,
// BandColour), which reads in greyscale and to colour-blind readers.
package report
