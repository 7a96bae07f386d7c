// Package terrain reads elevation data and extracts terrain profiles.
//
// It covers SRTM HGT tiles (.hgt, .hgt.zip, .hgt.gz; 1″ and 3″), single-band
// geographic GeoTIFF DEMs, a tile set over directories with a memory-bounded
// cache, bilinear sampling with void filling, and profiles along WGS84
// geodesics computed with Karney's algorithm (C. F. F. Karney, "Algorithms
// for geodesics", J. Geodesy 87, 2013), and profiles to and from CSV files
// (a surveyed profile, or one from another tool).
//
// Conventions: latitudes and longitudes are decimal degrees on WGS84;
// functions taking both take latitude first unless they take an orb.Point
// (lon, lat). Azimuths are degrees clockwise from true north. Distances are
// metres along the ellipsoid. Heights are metres above the EGM96 geoid, as
// SRTM delivers them. The package knows nothing of radio.
package terrain
