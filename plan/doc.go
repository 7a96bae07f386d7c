// Package plan is the deployment planner: quantities with units, stations
// (radio, feedline, antenna, mast), targets, link budgets, mast-and-cable
// sweeps, route coverage, site ranking, RF-exposure evaluation and the YAML
// plan file.
//
// Units: the package works in SI internally (metres, watts, hertz given as
// MHz where the trade does, dB, dBm). Positions are orb.Point (lon, lat) in
// decimal degrees on WGS84. The package never prints; progress is reported
// through callbacks that the command renders.
package plan
