package propagation

import (
	"math"
	"testing"
)

func roughPathTmp(n int, lengthKM float64, seed uint32) Path {
	p := Path{DistKM: make([]float64, n), HeightM: make([]float64, n)}
	for i := range p.DistKM {
		d := lengthKM * float64(i) / float64(n-1)
		p.DistKM[i] = d
		x := d * 1000
		u := (uint32(i) + seed*7919) * 2654435761
		p.HeightM[i] = 600 + 350*math.Sin(x/7000+float64(seed)) + 150*math.Sin(x/1300) + 60*math.Sin(x/450) + float64(u>>24)/255*20
	}
	return p
}

func BenchmarkTmpScan(b *testing.B) {
	var ps []Path
	for k := range 256 {
		ps = append(ps, roughPathTmp(680, 14.8, uint32(k)))
	}
	rp, _ := Params{FreqMHz: 146, TxHeightM: 1.5, RxHeightM: 20}.resolve()
	i := 0
	for b.Loop() {
		scanProfile(ps[i&255], rp)
		i++
	}
}
