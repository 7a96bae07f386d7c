// Package propagation computes radio path loss over a terrain profile.
//
// It implements the effective earth radius (ITU-R P.530-19 §2.2, ITU-R
// P.1812-8 eq. 6), the radio horizon and earth bulge (ITU-R P.526-16
// eqs. 21, 49), first Fresnel-zone radius and path clearance (P.526-16
// eqs. 2–3), free-space basic transmission loss (ITU-R P.525-4), knife-edge
// diffraction by the approximation and by Fresnel integrals (P.526-16
// eqs. 26, 30, 31), smooth spherical-earth diffraction (P.526-16 §3.1.1 and
// §3.2) and the delta-Bullington method for a general path (P.526-16 §4.5),
// and the probability of a working link under location variability (ITU-R
// P.1812-8 eq. 69 and Attachment 2), and the Longley–Rice Irregular
// Terrain Model in point-to-point mode (G. A. Hufford, "The ITS Irregular
// Terrain Model, version 1.2.2: the Algorithm", NTIA/ITS, 1995).
//
// A Model turns a Path and Params into a Result: FreeSpace, Terrain
// (delta-Bullington, which over a flat profile is smooth-earth diffraction)
// and ITM (Longley–Rice, with its variability in time, location and
// situation). Further models join by implementing Model.
//
// Conventions: a Path runs from the transmitter (first point) to the
// receiver (last point); distances along it are in km from the
// transmitter, terrain and clutter heights in metres (terrain above mean sea
// level, as the elevation data gives it), antenna heights in metres above
// the ground at each end, frequency in MHz, effective earth radius in km,
// losses in dB. A profile crosses into this package as plain slices; the
// package knows nothing of files, tiles or GPX, and never prints.
package propagation
