// Package feedline models the coaxial line between a radio and its
// antenna: a catalog of common cables with the matched loss of each fitted
// to published figures (A(f) = K1·√f + K2·f dB per 100 ft, conductor plus
// dielectric loss), cables of the user's own described by their loss at one
// or two frequencies ("custom:6.1dB/100ft@146MHz"), the extra loss an SWR
// causes on a lossy line, mismatch and return loss, connectors, and the
// loss of a whole Line at one frequency.
//
// Units: lengths in metres, frequencies in MHz, losses in dB; published
// figures are kept in dB per 100 ft, the unit of most tables. The package
// imports only plan/units of mastlink and never prints.
package feedline
