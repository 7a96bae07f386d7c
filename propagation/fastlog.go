package propagation

import "math"

// lnFast returns the natural logarithm of x within about 5e−16 (absolute,
// for x near 1; relative elsewhere), several times faster than math.Log:
// x = 2^k·m with m in [1, 2), m = c·(1 + r) with c the middle of the
// 1/256-wide interval holding m (ln c from a table of 256, 1/c likewise, so
// |r| < 1/512), and ln(1 + r) by its Taylor series to r⁵ (the next term is
// below 4e−17; common practice, e.g. Tang, "Table-driven implementation of
// the logarithm function in IEEE floating-point arithmetic", ACM TOMS 16(4),
// 1990, from memory). Zero, negative, subnormal, infinite and NaN
// arguments go to math.Log.
func lnFast(x float64) float64 {
	b := math.Float64bits(x)
	e := int(b>>52) - 1023 // sign bit set: e ≥ 1025
	if e <= -1023 || e >= 1024 {
		return math.Log(x)
	}
	i := (b >> 44) & 0xff
	m := math.Float64frombits(b&(1<<52-1) | 1023<<52)
	t := &lnTable[i]
	r := m*t.inv - 1
	// ln(1 + r) = r − r²/2 + r³/3 − r⁴/4 + r⁵/5, in Estrin's order (short
	// dependency chains).
	r2 := r * r
	p := r + r2*(-0.5+r*(1.0/3)) + r2*r2*(-0.25+r*0.2)
	return float64(e)*math.Ln2 + t.ln + p
}

// log10Fast is lnFast(x)/ln 10.
func log10Fast(x float64) float64 { return lnFast(x) * (1 / math.Ln10) }

var lnTable = func() (t [256]struct{ ln, inv float64 }) {
	for i := range t {
		c := 1 + (float64(i)+0.5)/256
		t[i].ln = math.Log(c)
		t[i].inv = 1 / c
	}
	return t
}()
