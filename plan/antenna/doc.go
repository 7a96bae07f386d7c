// Package antenna is the antenna side of a portable VHF/UHF deployment: a
// catalog of the antennas a team actually carries, a simple pattern model
// that gives each one's gain toward any direction, the loss of a handheld
// held against the body, and the trimming rule for resonant elements.
//
// The catalog (Catalog, Lookup) holds handheld stubs and whips, dipoles,
// ground planes, end-fed and 5/8-wave verticals, collinears and small
// Yagis for 2 m and 70 cm. Every figure (gain in dBi, half-power
// beamwidths, front-to-back ratio) carries its source: a published figure
// with the document it comes from, or "typical", meaning common practice
// with no single source; figures recalled rather than read say "from
// memory".
//
// The pattern model (Antenna.GainTowardDBi) is the cosⁿ main lobe of the
// antenna textbooks, one exponent per principal plane fitted to that
// plane's half-power beamwidth, with a floor at the catalog gain less the
// front-to-back ratio for directional antennas. It is a planning model: it
// gets boresight, the half-power points and the back right and says
// nothing of sidelobes or ground reflections.
//
// Trim scales resonant element lengths by measured over wanted resonant
// frequency (common practice); QuarterWaveM and HalfWaveM give starting
// lengths to cut long and trim.
//
// Conventions: azimuths and bearings in degrees clockwise from true
// north; elevation in degrees above the horizontal (negative below);
// gains in dBi; losses and ratios in dB (positive numbers); frequencies in
// MHz; lengths in metres. The package imports nothing of mastlink's and
// never prints.
package antenna
