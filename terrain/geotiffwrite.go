package terrain

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strconv"
)

// GeoTIFFGrid is a single-band float32 raster in WGS84 geographic
// coordinates (EPSG:4326) to be written as a GeoTIFF. Cells are areas
// (pixel-is-area): cell (row r, column c) covers latitudes North − (r+1)·DLat
// to North − r·DLat and longitudes West + c·DLon to West + (c+1)·DLon,
// degrees; rows run from the north.
type GeoTIFFGrid struct {
	Values      []float32 // Rows × Cols, row-major from the north row
	Rows, Cols  int
	West, North float64 // degrees: the outer corner of the north-west cell
	DLatDeg     float64 // cell height, degrees (> 0)
	DLonDeg     float64 // cell width, degrees (> 0)
	NoData      float32 // value marking cells without data (NaN allowed), written as GDAL_NODATA
}

// TIFF field types (TIFF 6.0 §2).
const (
	tiffShort  = 3
	tiffLong   = 4
	tiffASCII  = 2
	tiffDouble = 12
)

// EncodeGeoTIFF writes g as a little-endian baseline TIFF (TIFF 6.0,
// Adobe 1992) with GeoTIFF 1.1 georeferencing (OGC 19-008r4): one band of
// 32-bit IEEE floats (SampleFormat 3), uncompressed strips of at most
// 64 KiB; ModelPixelScale (DLon, DLat, 0) and ModelTiepoint (0, 0, 0 →
// West, North, 0); GeoKeyDirectory with GTModelType geographic (2),
// GTRasterType pixel-is-area (1) and GeographicType EPSG:4326; and GDAL's
// GDAL_NODATA tag (42113) holding NoData as text. The same grid always
// gives the same bytes. Errors: an inconsistent grid, a file over 4 GiB,
// or the writer's error.
func EncodeGeoTIFF(w io.Writer, g GeoTIFFGrid) error {
	if g.Rows <= 0 || g.Cols <= 0 || len(g.Values) != g.Rows*g.Cols {
		return fmt.Errorf("geotiff: %d values for a %d × %d grid", len(g.Values), g.Rows, g.Cols)
	}
	if !(g.DLatDeg > 0) || !(g.DLonDeg > 0) || math.IsInf(g.DLatDeg, 0) || math.IsInf(g.DLonDeg, 0) ||
		!(g.North <= 90 && g.North-float64(g.Rows)*g.DLatDeg >= -90-1e-9) || !(g.West >= -540 && g.West <= 540) {
		return fmt.Errorf("geotiff: grid at west %g°, north %g° with cells %g° × %g° is not a valid geographic extent", g.West, g.North, g.DLonDeg, g.DLatDeg)
	}
	rowBytes := 4 * g.Cols
	rowsPerStrip := max(1, 65536/rowBytes)
	strips := (g.Rows + rowsPerStrip - 1) / rowsPerStrip
	imageBytes := int64(rowBytes) * int64(g.Rows)
	if imageBytes > math.MaxUint32-1<<20 {
		return fmt.Errorf("geotiff: %d × %d float32 cells need %d bytes, over the 4 GiB of a classic TIFF", g.Rows, g.Cols, imageBytes)
	}

	nodata := strconv.FormatFloat(float64(g.NoData), 'g', -1, 32)
	if g.NoData != g.NoData {
		nodata = "nan"
	}
	type entry struct {
		tag, typ uint16
		count    uint32
		data     []byte // little-endian values
	}
	le := binary.LittleEndian
	shorts := func(v ...uint16) []byte {
		b := make([]byte, 2*len(v))
		for i, x := range v {
			le.PutUint16(b[2*i:], x)
		}
		return b
	}
	longs := func(v ...uint32) []byte {
		b := make([]byte, 4*len(v))
		for i, x := range v {
			le.PutUint32(b[4*i:], x)
		}
		return b
	}
	doubles := func(v ...float64) []byte {
		b := make([]byte, 8*len(v))
		for i, x := range v {
			le.PutUint64(b[8*i:], math.Float64bits(x))
		}
		return b
	}
	offsets := make([]uint32, strips)
	counts := make([]uint32, strips)
	const dataStart = 8 // image data right after the header
	for i := range strips {
		rows := min(rowsPerStrip, g.Rows-i*rowsPerStrip)
		offsets[i] = uint32(dataStart + int64(i)*int64(rowsPerStrip)*int64(rowBytes))
		counts[i] = uint32(rows * rowBytes)
	}
	geoKeys := shorts(
		1, 1, 0, 3, // KeyDirectoryVersion 1, KeyRevision 1.0, 3 keys
		1024, 0, 1, 2, // GTModelTypeGeoKey: ModelTypeGeographic
		1025, 0, 1, 1, // GTRasterTypeGeoKey: RasterPixelIsArea
		2048, 0, 1, 4326, // GeographicTypeGeoKey: EPSG:4326 (WGS 84)
	)
	entries := []entry{
		{256, tiffLong, 1, longs(uint32(g.Cols))},
		{257, tiffLong, 1, longs(uint32(g.Rows))},
		{258, tiffShort, 1, shorts(32)}, // BitsPerSample
		{259, tiffShort, 1, shorts(1)},  // Compression: none
		{262, tiffShort, 1, shorts(1)},  // PhotometricInterpretation: BlackIsZero
		{273, tiffLong, uint32(strips), longs(offsets...)},
		{277, tiffShort, 1, shorts(1)}, // SamplesPerPixel
		{278, tiffLong, 1, longs(uint32(rowsPerStrip))},
		{279, tiffLong, uint32(strips), longs(counts...)},
		{284, tiffShort, 1, shorts(1)}, // PlanarConfiguration: contiguous
		{339, tiffShort, 1, shorts(3)}, // SampleFormat: IEEE floating point
		{33550, tiffDouble, 3, doubles(g.DLonDeg, g.DLatDeg, 0)},
		{33922, tiffDouble, 6, doubles(0, 0, 0, g.West, g.North, 0)},
		{34735, tiffShort, uint32(len(geoKeys) / 2), geoKeys},
		{42113, tiffASCII, uint32(len(nodata) + 1), append([]byte(nodata), 0)},
	}
	// Layout: header, image data, values too long for their entry, IFD.
	extraStart := int64(dataStart) + imageBytes
	var extra []byte
	for i := range entries {
		if len(entries[i].data) > 4 {
			if (extraStart+int64(len(extra)))%2 == 1 {
				extra = append(extra, 0) // word alignment (TIFF 6.0 §2)
			}
			off := uint32(extraStart + int64(len(extra)))
			extra = append(extra, entries[i].data...)
			entries[i].data = longs(off)
		}
	}
	ifdStart := extraStart + int64(len(extra))
	if ifdStart%2 == 1 {
		extra = append(extra, 0)
		ifdStart++
	}

	bw := bufio.NewWriterSize(w, 1<<16)
	bw.Write([]byte{'I', 'I', 42, 0})
	bw.Write(longs(uint32(ifdStart)))
	buf := make([]byte, rowBytes)
	for r := range g.Rows {
		for c, v := range g.Values[r*g.Cols : (r+1)*g.Cols] {
			le.PutUint32(buf[4*c:], math.Float32bits(v))
		}
		bw.Write(buf)
	}
	bw.Write(extra)
	bw.Write(shorts(uint16(len(entries))))
	for _, e := range entries {
		bw.Write(shorts(e.tag, e.typ))
		bw.Write(longs(e.count))
		var v [4]byte
		copy(v[:], e.data)
		bw.Write(v[:])
	}
	bw.Write(longs(0)) // no further IFD
	return bw.Flush()
}
