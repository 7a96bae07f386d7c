package terrain_test

import (
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"

	"github.com/mastlink/mastlink/terrain"
)

// writeHillTile writes an invented 3″ SRTM tile N45E007.hgt into dir: a
// round hill 700 m high, centred at 45.5°N 7.5°E, on a 300 m plain.
func writeHillTile(dir string) {
	const n = terrain.HGTSamples3
	raw := make([]byte, 2*n*n)
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			dy, dx := float64(r-600)/100, float64(c-600)/100
			h := 300 + 700*math.Exp(-(dx*dx+dy*dy)/2)
			binary.BigEndian.PutUint16(raw[2*(r*n+c):], uint16(int16(math.Round(h))))
		}
	}
	os.WriteFile(filepath.Join(dir, "N45E007.hgt"), raw, 0o644)
}

func ExampleOpen() {
	dir, _ := os.MkdirTemp("", "dem")
	defer os.RemoveAll(dir)
	writeHillTile(dir)

	set, err := terrain.Open(dir)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d file, finest spacing at 45.5°N: %.1f m\n", set.Len(), set.SpacingM(45.5))
	// Output: 1 file, finest spacing at 45.5°N: 65.1 m
}

func ExampleSet_Elevation() {
	dir, _ := os.MkdirTemp("", "dem")
	defer os.RemoveAll(dir)
	writeHillTile(dir)
	set, _ := terrain.Open(dir)

	for _, p := range [][2]float64{{45.5, 7.5}, {45.45, 7.55}, {47.2, 7.5}} {
		h, src, err := set.Elevation(p[0], p[1])
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%.2f°N %.2f°E: %6.1f m (%s)\n", p[0], p[1], h, src)
	}
	fmt.Println("missing:", set.Missing())
	// Output:
	// 45.50°N 7.50°E: 1000.0 m (N45E007.hgt)
	// 45.45°N 7.55°E:  788.0 m (N45E007.hgt)
	// 47.20°N 7.50°E:    0.0 m (none)
	// missing: [N47E007.hgt]
}

func ExampleSet_Profile() {
	dir, _ := os.MkdirTemp("", "dem")
	defer os.RemoveAll(dir)
	writeHillTile(dir)
	set, _ := terrain.Open(dir)

	var p terrain.Profile // reuse p for further profiles: no allocation then
	if err := set.Profile(45.3, 7.2, 45.7, 7.8, 0, &p); err != nil {
		fmt.Println(err)
		return
	}
	top := slices.Index(p.ElevM, slices.Max(p.ElevM))
	fmt.Printf("%.0f m, azimuth %.1f°, back %.1f°\n", p.DistanceM, p.AzimuthDeg, p.BackAzimuthDeg)
	fmt.Printf("%d samples every %.1f m from %v\n", p.Len(), p.StepM, p.Sources)
	fmt.Printf("highest %.0f m at %.0f m (%.4f°N %.4f°E)\n", p.ElevM[top], p.DistM[top], p.Lat[top], p.Lon[top])
	// Output:
	// 64618 m, azimuth 46.3°, back 226.7°
	// 997 samples every 64.9 m from [N45E007.hgt]
	// highest 1000 m at 32179 m (45.4996°N 7.4977°E)
}

func ExampleSet_ProfileHeights() {
	dir, _ := os.MkdirTemp("", "dem")
	defer os.RemoveAll(dir)
	writeHillTile(dir)
	set, _ := terrain.Open(dir)

	// The same path as ExampleSet_Profile, heights only: sample i lies
	// i·StepM metres along the geodesic.
	var p terrain.Profile
	if err := set.ProfileHeights(45.3, 7.2, 45.7, 7.8, 0, &p); err != nil {
		fmt.Println(err)
		return
	}
	top := slices.Index(p.ElevM, slices.Max(p.ElevM))
	fmt.Printf("%d samples every %.1f m, no positions kept: %v\n", p.Len(), p.StepM, len(p.Lat) == 0)
	fmt.Printf("highest %.0f m at %.0f m\n", p.ElevM[top], float64(top)*p.StepM)
	// Output:
	// 997 samples every 64.9 m, no positions kept: true
	// highest 1000 m at 32179 m
}
