package propagation

// HorizonLOS is the line-of-sight test of Radial as plain numbers, for a
// caller that keeps the running maximum of the slopes itself (one number
// per radial and sample instead of a Radial per receiver): ITU-R P.526-16
// eqs. 49 and 50 in the transmitter's tangent-plane frame, where a point
// d km out at h m amsl lies at y = h − 500 C_e d² (C_e = 1/a_e).
type HorizonLOS struct {
	HtsM  float64 // transmitting antenna, m amsl (ground plus mast)
	RxM   float64 // receiving antenna above its ground, m
	Bulge float64 // 500 C_e, m/km² (C_e in 1/km)
}

// NewHorizonLOS returns the test for a transmitter whose ground is
// siteGroundM metres amsl, with the antenna heights and effective earth
// radius of prm (defaults as in Params). Errors wrap ErrBadParams.
func NewHorizonLOS(prm Params, siteGroundM float64) (HorizonLOS, error) {
	rp, err := prm.resolve()
	if err != nil {
		return HorizonLOS{}, err
	}
	return HorizonLOS{HtsM: siteGroundM + rp.txM, RxM: rp.rxM, Bulge: 500 / rp.aeKM}, nil
}

// Slope returns (y − h_ts)/d, in m/km, of a terrain point distKM km out
// (> 0) at heightM m amsl: S_tim of eq. 49 is the largest of these over
// the intermediate points, plus 500 C_e d.
func (h HorizonLOS) Slope(distKM, heightM float64) float64 {
	return (heightM - h.Bulge*distKM*distKM - h.HtsM) / distKM
}

// Visible reports eq. 50, S_tim < S_tr, for a receiver distKM km out on
// ground groundM m amsl, given the largest Slope of the points before it
// (−∞ for none: visible).
func (h HorizonLOS) Visible(maxSlope, distKM, groundM float64) bool {
	return (maxSlope+h.Bulge*distKM)*distKM < groundM+h.RxM-h.HtsM
}
