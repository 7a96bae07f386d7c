// Package plan is the deployment planner: stations and targets with their
// kit (station.go), the requirement every link must meet (requirement.go),
// the plan file (planfile.go, YAML, every error naming file, line and
// field), one link over terrain (link.go: Env, Geometry, Evaluate), a whole
// plan both ways (evaluate.go), the mast-and-cable sweep (mast.go), coverage
// along a track (route.go, track.go), site ranking (sites.go), the legs a
// target is checked in (legs.go) and the worker pool that runs many paths
// on all cores (parallel.go).
//
// Its subpackages are the leaves it builds on: units (quantities and
// decibel conversions), feedline (cables, SWR, connectors), exposure (RF
// exposure and keep-out) and gpx (waypoints and tracks); report draws
// results as pictures. Path loss comes from package propagation, ground
// heights and profiles from package terrain.
//
// Units: SI throughout (metres, watts, dB, dBm), frequencies in MHz as the
// trade gives them; names carry their unit (HeightM, FreqMHz, MarginDB).
// Positions are orb.Point (lon, lat) in decimal degrees on WGS84; azimuths
// are degrees clockwise from true north. The package never prints; long
// work reports through a Progress callback that the command renders.
package plan
