// Package propagation computes radio path loss over a terrain profile.
//
// It implements the effective earth radius (ITU-R P.310/P.530, P.1812 eq. 6),
// radio horizon and earth bulge (ITU-R P.526-16), first Fresnel zone radius
// and clearance, free-space basic transmission loss (ITU-R P.525), knife-edge
// and delta-Bullington diffraction and smooth spherical-earth diffraction
// (ITU-R P.526-16 §3 and §4), and location variability (ITU-R P.1812-8).
//
// Conventions: distances along a path in km where the Recommendation uses
// km (profile distances), heights in metres above mean sea level, frequency
// in MHz, losses in dB. A profile crosses into this package as plain
// distance/height slices; the package knows nothing of files, tiles or GPX.
package propagation
