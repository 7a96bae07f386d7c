// Package exposure estimates the RF exposure around one transmitting
// station: the exposure limits (US 47 CFR § 1.1310(e)(1) Table 1, ICNIRP
// 2020 Table 5, ICNIRP 1998 Tables 6 and 7), the time-averaged power from
// the emission's duty factor and the worst-case time on the air in each
// averaging window (FCC OET Bulletin 65 Supplement B, ed. 97-01), far-field
// compliance distances with ground reflection (FCC OET Bulletin 65,
// ed. 97-01, eqs. 3–6), keep-out radii around a mast foot and keep-out
// circles on the WGS84 ellipsoid, the US exemption from routine evaluation
// (47 CFR § 1.1307(b)(3)(i)(C)), and the cautions to show with every
// result. Options is the one parser of a station's exposure habits, shared
// by the exposure command and the plan file.
//
// Every figure is an estimate to plan with, not a measurement; the
// cautions returned with each Report say so. Safety distances are computed
// exactly here; whoever prints them rounds them up.
//
// Units: power in W, gain in dBi, frequency in MHz, distances and heights
// in metres, power density in W/m², times as time.Duration. Positions are
// orb.Point (lon, lat) in degrees on WGS84. The package never prints.
package exposure
