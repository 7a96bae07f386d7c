package terrain_test

import (
	"fmt"
	"path/filepath"

	"github.com/mastlink/mastlink/terrain"
)

// A small int16 LZW GeoTIFF written by GDAL (testdata/geotiff): 18×13
// samples 30″ apart, with a few nodata cells.
func ExampleReadGeoTIFF() {
	path := filepath.Join("testdata", "geotiff", "int16_lzw_pred2_strips.tif")
	tile, err := terrain.ReadGeoTIFF(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d×%d samples, %.0f″ × %.0f″, %d voids\n",
		tile.Name, tile.Cols, tile.Rows, tile.DLon*3600, tile.DLat*3600, tile.Voids)
	fmt.Printf("north-west sample %.6f°N %.6f°E: %.0f m\n", tile.Lat0, tile.Lon0, tile.H[0])
	fmt.Printf("at 44.30°N 9.55°E: %.1f m\n", tile.At(44.30, 9.55))
	// Output:
	// int16_lzw_pred2_strips.tif: 18×13 samples, 30″ × 30″, 6 voids
	// north-west sample 44.354167°N 9.504167°E: 497 m
	// at 44.30°N 9.55°E: 567.5 m
}

func ExampleGeoTIFFBounds() {
	w, s, e, n, err := terrain.GeoTIFFBounds(filepath.Join("testdata", "geotiff", "float32_lzw_pred3_tiles.tif"))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("sample centres span %.6f–%.6f°E, %.6f–%.6f°N\n", w, e, s, n)
	// Output:
	// sample centres span 9.504167–9.645833°E, 44.254167–44.354167°N
}
