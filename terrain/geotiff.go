package terrain

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"golang.org/x/image/tiff/lzw"
)

// This file reads single-band elevation GeoTIFFs in geographic WGS84
// coordinates. The container is TIFF 6.0 (Adobe, 1992) with the BigTIFF
// extension (libtiff, 2007); georeferencing follows the OGC GeoTIFF 1.1
// standard (OGC 19-008r4, 2019): ModelPixelScale, ModelTiepoint,
// ModelTransformation and the GeoKeyDirectory. The nodata value is GDAL's
// private ASCII tag GDAL_NODATA (42113).

// ErrBadGeoTIFF is wrapped by errors for files that are not well-formed
// TIFF/GeoTIFF: truncated, inconsistent or out-of-range headers and data.
var ErrBadGeoTIFF = errors.New("malformed GeoTIFF")

// ErrUnsupportedGeoTIFF is wrapped by errors for well-formed GeoTIFFs this
// reader does not handle (projected or non-WGS84 coordinates, several bands,
// sample types other than int16/uint16/float32, JPEG compression …). The
// message says how to convert the file with GDAL.
var ErrUnsupportedGeoTIFF = errors.New("unsupported GeoTIFF")

// GeoTIFFError describes a GeoTIFF that could not be read, in the manner of
// strconv.NumError: which file, which tag or GeoKey, what is wrong, and the
// sentinel (ErrBadGeoTIFF or ErrUnsupportedGeoTIFF) it wraps.
type GeoTIFFError struct {
	File  string // file base name
	Field string // tag or GeoKey concerned, e.g. "tag 33550 ModelPixelScale"; empty for the file as a whole
	Msg   string // what is wrong and, where possible, how to fix it
	Err   error  // ErrBadGeoTIFF or ErrUnsupportedGeoTIFF
}

// Error formats the error as "file: field: message".
func (e *GeoTIFFError) Error() string {
	if e.Field == "" {
		return e.File + ": " + e.Msg
	}
	return e.File + ": " + e.Field + ": " + e.Msg
}

// Unwrap returns the sentinel, so errors.Is(err, ErrBadGeoTIFF) works.
func (e *GeoTIFFError) Unwrap() error { return e.Err }

// Limits against hostile headers (our own choice, far above any DEM tile).
const (
	geoTIFFMaxSide    = 100000  // samples per side
	geoTIFFMaxSamples = 1 << 31 // samples in the whole grid
	geoTIFFMaxBlock   = 1 << 16 // tile width or height, samples
	geoTIFFMaxEntries = 4096    // IFD entries
	geoTIFFMaxTagData = 1 << 26 // bytes of one tag's values
)

// TIFF tags used here (TIFF 6.0 §8 and Appendix A; GeoTIFF 1.1 §7; GDAL).
const (
	tagImageWidth     = 256
	tagImageLength    = 257
	tagBitsPerSample  = 258
	tagCompression    = 259
	tagStripOffsets   = 273
	tagSamplesPerPix  = 277
	tagRowsPerStrip   = 278
	tagStripBytes     = 279
	tagPlanarConfig   = 284
	tagPredictor      = 317
	tagTileWidth      = 322
	tagTileLength     = 323
	tagTileOffsets    = 324
	tagTileBytes      = 325
	tagSampleFormat   = 339
	tagPixelScale     = 33550
	tagTiepoint       = 33922
	tagTransformation = 34264
	tagGeoKeys        = 34735
	tagGDALNodata     = 42113
)

var geoTIFFTagNames = map[uint16]string{
	tagImageWidth: "ImageWidth", tagImageLength: "ImageLength",
	tagBitsPerSample: "BitsPerSample", tagCompression: "Compression",
	tagStripOffsets: "StripOffsets", tagSamplesPerPix: "SamplesPerPixel",
	tagRowsPerStrip: "RowsPerStrip", tagStripBytes: "StripByteCounts",
	tagPlanarConfig: "PlanarConfiguration", tagPredictor: "Predictor",
	tagTileWidth: "TileWidth", tagTileLength: "TileLength",
	tagTileOffsets: "TileOffsets", tagTileBytes: "TileByteCounts",
	tagSampleFormat: "SampleFormat", tagPixelScale: "ModelPixelScale",
	tagTiepoint: "ModelTiepoint", tagTransformation: "ModelTransformation",
	tagGeoKeys: "GeoKeyDirectory", tagGDALNodata: "GDAL_NODATA",
}

func geoTIFFField(tag uint16) string {
	return fmt.Sprintf("tag %d %s", tag, geoTIFFTagNames[tag])
}

// GeoKeys used here (GeoTIFF 1.1 §7.1 and Annex B).
const (
	keyModelType     = 1024 // GTModelTypeGeoKey: 1 projected, 2 geographic, 3 geocentric
	keyRasterType    = 1025 // GTRasterTypeGeoKey: 1 pixel-is-area, 2 pixel-is-point
	keyGeographic    = 2048 // GeodeticCRSGeoKey (GeographicTypeGeoKey in 1.0)
	keyDatum         = 2050 // GeodeticDatumGeoKey
	keyPrimeMeridian = 2051 // PrimeMeridianGeoKey
	keyAngularUnits  = 2054 // GeogAngularUnitsGeoKey
	keyEllipsoid     = 2056 // EllipsoidGeoKey
	keyProjected     = 3072 // ProjectedCRSGeoKey

	epsgWGS84      = 4326  // EPSG geographic CRS WGS 84
	epsgWGS84Datum = 6326  // EPSG datum WGS 84
	epsgWGS84Ellip = 7030  // EPSG ellipsoid WGS 84
	epsgGreenwich  = 8901  // EPSG prime meridian Greenwich
	epsgDegree     = 9102  // EPSG unit degree
	geoKeyUser     = 32767 // user-defined
)

const geoTIFFWarpHint = "gdalwarp -t_srs EPSG:4326 in.tif out.tif"

// ReadGeoTIFF reads a single-band GeoTIFF DEM in geographic WGS84 degrees
// (EPSG:4326) into a Tile of heights in metres; Name is the file's base name.
// It implements the TIFF 6.0 baseline and extensions (strips, tiles,
// predictors; Adobe TIFF Technical Note 3 for the floating-point predictor),
// BigTIFF, and the georeferencing of OGC GeoTIFF 1.1 (19-008r4) §7.
//
// Supported: classic TIFF and BigTIFF in either byte order; int16, uint16
// or float32 samples; strips or tiles; no compression, LZW, Deflate or
// PackBits; predictor 1 (none), 2 (horizontal differencing) or 3 (floating
// point); PlanarConfiguration 1. Samples equal to the GDAL_NODATA value
// become NaN and are counted in Tile.Voids; they are not filled here.
// Pixel-is-area files (GTRasterTypeGeoKey 1, the default) are read as
// samples at pixel centres, half a pixel in from the tiepoint; pixel-is-point
// files (2) at the tiepoint itself. South-up or east-to-west grids are
// flipped so that row 0 is the north row. Projected or non-WGS84 files are
// refused with an error wrapping ErrUnsupportedGeoTIFF that names the gdalwarp
// command converting them; malformed files wrap ErrBadGeoTIFF.
func ReadGeoTIFF(path string) (*Tile, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return nil, err
	}
	return DecodeGeoTIFF(f, st.Size(), filepath.Base(path))
}

// DecodeGeoTIFF decodes a GeoTIFF DEM of size bytes read through r, as
// ReadGeoTIFF does for a file; name becomes Tile.Name and prefixes errors.
// Hostile input is refused with an error, never a panic or an allocation
// larger than the compressed data can expand to; so is a grid holding a
// height outside MinPlausibleM…MaxPlausibleM (ErrImplausibleHeight).
func DecodeGeoTIFF(r io.ReaderAt, size int64, name string) (*Tile, error) {
	g, err := readGeoTIFFHeader(r, size, name)
	if err != nil {
		return nil, err
	}
	t := &Tile{
		Name: name, Rows: g.height, Cols: g.width,
		Lat0: g.lat0, Lon0: g.lon0, DLat: g.dlat, DLon: g.dlon,
		H: make([]float32, g.width*g.height),
	}
	if err := g.decode(t.H); err != nil {
		return nil, err
	}
	if err := t.checkHeights(); err != nil {
		return nil, fmt.Errorf("%s: %w: %w", name, ErrBadGeoTIFF, err)
	}
	for _, h := range t.H {
		if h != h {
			t.Voids++
		}
	}
	return t, nil
}

// GeoTIFFBounds reads only the header of the GeoTIFF at path and returns
// the extent of its sample grid in degrees (WGS84): the outermost sample
// centres, in the pixel-is-point convention of Tile, not the outer pixel
// edges. It refuses the same files ReadGeoTIFF refuses.
func GeoTIFFBounds(path string) (west, south, east, north float64, err error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, 0, 0, 0, err
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return 0, 0, 0, 0, err
	}
	g, err := readGeoTIFFHeader(f, st.Size(), filepath.Base(path))
	if err != nil {
		return 0, 0, 0, 0, err
	}
	west, north = g.lon0, g.lat0
	east = g.lon0 + float64(g.width-1)*g.dlon
	south = g.lat0 - float64(g.height-1)*g.dlat
	return west, south, east, north, nil
}

// geoTIFFHeader is everything needed to decode the first image of a file.
type geoTIFFHeader struct {
	r             io.ReaderAt
	size          int64
	name          string
	bo            binary.ByteOrder
	width, height int
	bytesPer      int // bytes per sample: 2 or 4
	format        int // SampleFormat: 1 unsigned, 2 signed, 3 float
	compression   int
	predictor     int
	blockW        int // tile width, or image width for strips
	blockH        int // tile length, or rows per strip
	tiled         bool
	offsets       []uint64
	counts        []uint64
	nodata        float64
	hasNodata     bool
	lat0, lon0    float64 // north-west sample centre, degrees
	dlat, dlon    float64 // sample spacing, degrees, positive
	flipRows      bool    // file rows run south to north
	flipCols      bool    // file columns run east to west
}

// tiffEntry is one IFD entry, its values not yet read.
type tiffEntry struct {
	typ    uint16
	count  uint64
	inline []byte // the value field: 4 bytes (classic) or 8 (BigTIFF)
}

// tiffIFD reads tag values from one image file directory.
type tiffIFD struct {
	r       io.ReaderAt
	size    int64
	name    string
	bo      binary.ByteOrder
	big     bool
	entries map[uint16]tiffEntry
}

func (d *tiffIFD) bad(field, format string, a ...any) error {
	return &GeoTIFFError{File: d.name, Field: field, Msg: fmt.Sprintf(format, a...), Err: ErrBadGeoTIFF}
}

func (d *tiffIFD) unsupported(field, format string, a ...any) error {
	return &GeoTIFFError{File: d.name, Field: field, Msg: fmt.Sprintf(format, a...), Err: ErrUnsupportedGeoTIFF}
}

// tiffTypeSize is the size in bytes of one value of each TIFF field type
// (TIFF 6.0 §2; BigTIFF adds 16 LONG8, 17 SLONG8, 18 IFD8).
func tiffTypeSize(typ uint16) int {
	switch typ {
	case 1, 2, 6, 7:
		return 1
	case 3, 8:
		return 2
	case 4, 9, 11, 13:
		return 4
	case 5, 10, 12, 16, 17, 18:
		return 8
	}
	return 0
}

// readAt reads n bytes at off, checking the range against the file size.
func (d *tiffIFD) readAt(field string, off, n uint64) ([]byte, error) {
	if n > uint64(d.size) || off > uint64(d.size)-n {
		return nil, d.bad(field, "%d bytes at offset %d run past the end of the %d-byte file (truncated download?)", n, off, d.size)
	}
	b := make([]byte, n)
	if m, err := d.r.ReadAt(b, int64(off)); m < len(b) {
		return nil, d.bad(field, "reading %d bytes at offset %d: %v", n, off, err)
	}
	return b, nil
}

// raw returns the bytes of a tag's values, or nil if the tag is absent.
func (d *tiffIFD) raw(tag uint16) (tiffEntry, []byte, error) {
	e, ok := d.entries[tag]
	if !ok {
		return e, nil, nil
	}
	field := geoTIFFField(tag)
	ts := tiffTypeSize(e.typ)
	if ts == 0 {
		return e, nil, d.bad(field, "unknown field type %d", e.typ)
	}
	if e.count == 0 {
		return e, nil, d.bad(field, "has no values")
	}
	if e.count > geoTIFFMaxTagData/uint64(ts) {
		return e, nil, d.bad(field, "%d values is more than any image needs", e.count)
	}
	n := e.count * uint64(ts)
	if n <= uint64(len(e.inline)) {
		return e, e.inline[:n], nil
	}
	var off uint64
	if d.big {
		off = d.bo.Uint64(e.inline)
	} else {
		off = uint64(d.bo.Uint32(e.inline))
	}
	b, err := d.readAt(field, off, n)
	return e, b, err
}

// uints returns the values of an unsigned integer tag (BYTE, SHORT, LONG,
// LONG8, IFD, IFD8), or nil if absent.
func (d *tiffIFD) uints(tag uint16) ([]uint64, error) {
	e, b, err := d.raw(tag)
	if b == nil || err != nil {
		return nil, err
	}
	v := make([]uint64, e.count)
	switch e.typ {
	case 1:
		for i := range v {
			v[i] = uint64(b[i])
		}
	case 3:
		for i := range v {
			v[i] = uint64(d.bo.Uint16(b[2*i:]))
		}
	case 4, 13:
		for i := range v {
			v[i] = uint64(d.bo.Uint32(b[4*i:]))
		}
	case 16, 18:
		for i := range v {
			v[i] = d.bo.Uint64(b[8*i:])
		}
	default:
		return nil, d.bad(geoTIFFField(tag), "field type %d where an unsigned integer is required", e.typ)
	}
	return v, nil
}

// uint returns the single value of an unsigned integer tag, or def if the
// tag is absent. Extra values must repeat the first (BitsPerSample and
// SampleFormat carry one per sample).
func (d *tiffIFD) uint(tag uint16, def uint64) (uint64, error) {
	v, err := d.uints(tag)
	if err != nil || v == nil {
		return def, err
	}
	for _, x := range v[1:] {
		if x != v[0] {
			return 0, d.unsupported(geoTIFFField(tag), "differs between samples (%d, %d); extract one band with gdal_translate -b 1 in.tif out.tif", v[0], x)
		}
	}
	return v[0], nil
}

// doubles returns the values of a DOUBLE tag, or nil if absent.
func (d *tiffIFD) doubles(tag uint16) ([]float64, error) {
	e, b, err := d.raw(tag)
	if b == nil || err != nil {
		return nil, err
	}
	if e.typ != 12 {
		return nil, d.bad(geoTIFFField(tag), "field type %d where DOUBLE (12) is required", e.typ)
	}
	v := make([]float64, e.count)
	for i := range v {
		v[i] = math.Float64frombits(d.bo.Uint64(b[8*i:]))
		if math.IsNaN(v[i]) || math.IsInf(v[i], 0) {
			return nil, d.bad(geoTIFFField(tag), "value %d is %v", i, v[i])
		}
	}
	return v, nil
}

// readGeoTIFFIFD reads the TIFF header and the first image file directory.
func readGeoTIFFIFD(r io.ReaderAt, size int64, name string) (*tiffIFD, error) {
	d := &tiffIFD{r: r, size: size, name: name}
	if size < 8 {
		return nil, d.bad("", "only %d bytes; a TIFF file starts with an 8-byte header", size)
	}
	var h [16]byte
	n := 16
	if size < 16 {
		n = int(size)
	}
	if m, err := r.ReadAt(h[:n], 0); m < n {
		return nil, d.bad("", "reading header: %v", err)
	}
	switch string(h[:2]) {
	case "II":
		d.bo = binary.LittleEndian
	case "MM":
		d.bo = binary.BigEndian
	default:
		return nil, d.bad("", "not a TIFF file (starts %q, want \"II\" or \"MM\")", h[:2])
	}
	var ifd uint64
	switch magic := d.bo.Uint16(h[2:]); magic {
	case 42:
		ifd = uint64(d.bo.Uint32(h[4:]))
	case 43:
		if size < 16 || d.bo.Uint16(h[4:]) != 8 || d.bo.Uint16(h[6:]) != 0 {
			return nil, d.bad("", "BigTIFF header is not the 16-byte form with 8-byte offsets")
		}
		d.big = true
		ifd = d.bo.Uint64(h[8:])
	default:
		return nil, d.bad("", "TIFF version %d, want 42 (classic) or 43 (BigTIFF)", magic)
	}
	countSize, entrySize := uint64(2), uint64(12)
	if d.big {
		countSize, entrySize = 8, 20
	}
	cb, err := d.readAt("first IFD", ifd, countSize)
	if err != nil {
		return nil, err
	}
	var ne uint64
	if d.big {
		ne = d.bo.Uint64(cb)
	} else {
		ne = uint64(d.bo.Uint16(cb))
	}
	if ne == 0 || ne > geoTIFFMaxEntries {
		return nil, d.bad("first IFD", "%d entries (want 1 to %d)", ne, geoTIFFMaxEntries)
	}
	eb, err := d.readAt("first IFD", ifd+countSize, ne*entrySize)
	if err != nil {
		return nil, err
	}
	d.entries = make(map[uint16]tiffEntry, ne)
	for i := uint64(0); i < ne; i++ {
		b := eb[i*entrySize : (i+1)*entrySize]
		tag := d.bo.Uint16(b)
		if _, dup := d.entries[tag]; dup {
			continue // TIFF 6.0 forbids duplicates; keep the first.
		}
		e := tiffEntry{typ: d.bo.Uint16(b[2:])}
		if d.big {
			e.count, e.inline = d.bo.Uint64(b[4:]), b[12:20]
		} else {
			e.count, e.inline = uint64(d.bo.Uint32(b[4:])), b[8:12]
		}
		d.entries[tag] = e
	}
	return d, nil
}

// readGeoTIFFHeader reads and checks everything but the pixel data.
func readGeoTIFFHeader(r io.ReaderAt, size int64, name string) (*geoTIFFHeader, error) {
	d, err := readGeoTIFFIFD(r, size, name)
	if err != nil {
		return nil, err
	}
	g := &geoTIFFHeader{r: r, size: size, name: name, bo: d.bo}
	if err := g.readLayout(d); err != nil {
		return nil, err
	}
	if err := g.readGeoreference(d); err != nil {
		return nil, err
	}
	if err := g.readNodata(d); err != nil {
		return nil, err
	}
	return g, nil
}

// readLayout reads image size, sample type, compression and block layout.
func (g *geoTIFFHeader) readLayout(d *tiffIFD) error {
	w, err := d.uint(tagImageWidth, 0)
	if err != nil {
		return err
	}
	h, err := d.uint(tagImageLength, 0)
	if err != nil {
		return err
	}
	if w == 0 || h == 0 {
		return d.bad(geoTIFFField(tagImageWidth), "image is %d×%d samples; both must be at least 1", w, h)
	}
	if w > geoTIFFMaxSide || h > geoTIFFMaxSide || w*h > geoTIFFMaxSamples {
		return d.unsupported(geoTIFFField(tagImageWidth), "image is %d×%d samples, more than the %d×%d (≤ 2^31 samples) this reader accepts; cut it with gdal_translate -srcwin", w, h, geoTIFFMaxSide, geoTIFFMaxSide)
	}
	g.width, g.height = int(w), int(h)

	spp, err := d.uint(tagSamplesPerPix, 1)
	if err != nil {
		return err
	}
	if spp != 1 {
		return d.unsupported(geoTIFFField(tagSamplesPerPix), "%d bands; extract the elevation band with gdal_translate -b 1 in.tif out.tif", spp)
	}
	bps, err := d.uint(tagBitsPerSample, 1)
	if err != nil {
		return err
	}
	sf, err := d.uint(tagSampleFormat, 1)
	if err != nil {
		return err
	}
	switch {
	case bps == 16 && (sf == 1 || sf == 2):
		g.bytesPer = 2
	case bps == 32 && sf == 3:
		g.bytesPer = 4
	default:
		kind := map[uint64]string{1: "unsigned integer", 2: "signed integer", 3: "floating-point"}[sf]
		if kind == "" {
			kind = fmt.Sprintf("SampleFormat %d", sf)
		}
		return d.unsupported(geoTIFFField(tagSampleFormat), "%d-bit %s samples; this reader takes int16, uint16 or float32 — convert with gdal_translate -ot Float32 in.tif out.tif", bps, kind)
	}
	g.format = int(sf)

	pc, err := d.uint(tagPlanarConfig, 1)
	if err != nil {
		return err
	}
	if pc != 1 && pc != 2 { // with one sample per pixel both layouts are the same
		return d.bad(geoTIFFField(tagPlanarConfig), "value %d, want 1 or 2", pc)
	}

	c, err := d.uint(tagCompression, 1)
	if err != nil {
		return err
	}
	switch c {
	case 1, 5, 8, 32946, 32773:
		g.compression = int(c)
	default:
		return d.unsupported(geoTIFFField(tagCompression), "compression %d is not supported (none, LZW, Deflate, PackBits are); rewrite with gdal_translate -co COMPRESS=DEFLATE in.tif out.tif", c)
	}
	p, err := d.uint(tagPredictor, 1)
	if err != nil {
		return err
	}
	switch {
	case p == 1 || p == 2:
	case p == 3 && g.format == 3:
	default:
		return d.unsupported(geoTIFFField(tagPredictor), "predictor %d with SampleFormat %d is not supported; rewrite with gdal_translate -co PREDICTOR=1 in.tif out.tif", p, g.format)
	}
	g.predictor = int(p)

	var offTag, cntTag uint16
	if _, ok := d.entries[tagTileWidth]; ok {
		g.tiled = true
		offTag, cntTag = tagTileOffsets, tagTileBytes
		tw, err := d.uint(tagTileWidth, 0)
		if err != nil {
			return err
		}
		th, err := d.uint(tagTileLength, 0)
		if err != nil {
			return err
		}
		if tw == 0 || th == 0 || tw > geoTIFFMaxBlock || th > geoTIFFMaxBlock {
			return d.bad(geoTIFFField(tagTileWidth), "tiles of %d×%d samples (want 1 to %d per side)", tw, th, geoTIFFMaxBlock)
		}
		g.blockW, g.blockH = int(tw), int(th)
	} else {
		offTag, cntTag = tagStripOffsets, tagStripBytes
		rps, err := d.uint(tagRowsPerStrip, math.MaxUint32)
		if err != nil {
			return err
		}
		if rps == 0 {
			return d.bad(geoTIFFField(tagRowsPerStrip), "zero rows per strip")
		}
		g.blockW, g.blockH = g.width, int(min(rps, h))
	}
	across := (g.width + g.blockW - 1) / g.blockW
	down := (g.height + g.blockH - 1) / g.blockH
	blocks := across * down
	if g.offsets, err = d.uints(offTag); err != nil {
		return err
	}
	if g.counts, err = d.uints(cntTag); err != nil {
		return err
	}
	if g.offsets == nil || g.counts == nil {
		return d.bad(geoTIFFField(offTag), "image data offsets or byte counts are missing")
	}
	if len(g.offsets) < blocks || len(g.counts) < blocks {
		return d.bad(geoTIFFField(offTag), "%d offsets and %d byte counts for %d blocks", len(g.offsets), len(g.counts), blocks)
	}
	g.offsets, g.counts = g.offsets[:blocks], g.counts[:blocks]
	var total uint64
	for i := range blocks {
		o, n := g.offsets[i], g.counts[i]
		if n == 0 {
			return d.unsupported(geoTIFFField(cntTag), "block %d has no data (a sparse file); rewrite with gdal_translate in.tif out.tif", i)
		}
		if n > uint64(g.size) || o > uint64(g.size)-n {
			return d.bad(geoTIFFField(cntTag), "block %d: %d bytes at offset %d run past the end of the %d-byte file (truncated download?)", i, n, o, g.size)
		}
		total += n
	}
	// Blocks do not overlap, so together they fit in the file; and the
	// image cannot be larger than its compressed data can expand to.
	if total > uint64(g.size) {
		return d.bad(geoTIFFField(cntTag), "blocks total %d bytes, more than the %d-byte file", total, g.size)
	}
	if need := uint64(g.width) * uint64(g.height) * uint64(g.bytesPer); need > g.maxExpand(total) {
		return d.bad(geoTIFFField(cntTag), "%d bytes of image data cannot hold a %d×%d image", total, g.width, g.height)
	}
	return nil
}

// maxExpand bounds the bytes n compressed bytes can decode to: stored data
// does not grow; each LZW code has at least 9 bits and expands to at most
// 4096 bytes (TIFF 6.0 §13); Deflate expands at most 1032:1 (zlib technical
// notes); a PackBits run of 2 bytes gives at most 128 (TIFF 6.0 §9).
func (g *geoTIFFHeader) maxExpand(n uint64) uint64 {
	switch g.compression {
	case 5:
		return (n*8/9 + 1) * 4096
	case 8, 32946:
		return (n + 1) * 1032
	case 32773:
		return (n/2 + 1) * 128
	}
	return n
}

// readGeoreference reads the GeoKeys and the raster-to-model mapping.
func (g *geoTIFFHeader) readGeoreference(d *tiffIFD) error {
	keys, err := d.uints(tagGeoKeys)
	if err != nil {
		return err
	}
	if keys == nil {
		return d.unsupported(geoTIFFField(tagGeoKeys), "missing: the file has no coordinate system; if it is in WGS84 degrees assign it with gdal_translate -a_srs EPSG:4326 in.tif out.tif, otherwise convert with %s", geoTIFFWarpHint)
	}
	if len(keys) < 4 {
		return d.bad(geoTIFFField(tagGeoKeys), "%d values, shorter than its 4-value header", len(keys))
	}
	if keys[0] != 1 {
		return d.bad(geoTIFFField(tagGeoKeys), "KeyDirectoryVersion %d, want 1", keys[0])
	}
	nk := keys[3]
	if uint64(len(keys)) < 4+4*nk {
		return d.bad(geoTIFFField(tagGeoKeys), "%d keys declared but only %d values", nk, len(keys))
	}
	key := map[uint64]uint64{}
	for i := uint64(0); i < nk; i++ {
		k := keys[4+4*i : 8+4*i]
		if k[1] == 0 && k[2] == 1 { // SHORT value held in the directory itself
			key[k[0]] = k[3]
		}
	}
	keyField := func(id uint64) string { return fmt.Sprintf("GeoKey %d", id) }

	switch mt := key[keyModelType]; mt {
	case 2:
	case 1:
		crs := ""
		if p := key[keyProjected]; p != 0 && p != geoKeyUser {
			crs = fmt.Sprintf(" (EPSG:%d)", p)
		}
		return d.unsupported(keyField(keyModelType), "projected coordinate system%s; convert to WGS84 degrees with: %s", crs, geoTIFFWarpHint)
	case 0:
		return d.unsupported(keyField(keyModelType), "GTModelTypeGeoKey is missing, so the coordinate system is unknown; if the grid is in WGS84 degrees assign it with gdal_translate -a_srs EPSG:4326 in.tif out.tif")
	default:
		return d.unsupported(keyField(keyModelType), "model type %d is not geographic (2); convert with: %s", mt, geoTIFFWarpHint)
	}
	// WGS84: the CRS code 4326, or a user-defined CRS on the WGS84 datum,
	// or a user-defined datum on the WGS84 ellipsoid.
	crs, datum, ellip := key[keyGeographic], key[keyDatum], key[keyEllipsoid]
	wgs84 := crs == epsgWGS84 ||
		((crs == 0 || crs == geoKeyUser) && datum == epsgWGS84Datum) ||
		((crs == 0 || crs == geoKeyUser) && (datum == 0 || datum == geoKeyUser) && ellip == epsgWGS84Ellip)
	if !wgs84 {
		if crs == 0 && datum == 0 && ellip == 0 {
			return d.unsupported(keyField(keyGeographic), "the geographic coordinate system is not given, so the datum is unknown; if it is WGS84 assign it with gdal_translate -a_srs EPSG:4326 in.tif out.tif, otherwise convert with: %s", geoTIFFWarpHint)
		}
		what := fmt.Sprintf("EPSG:%d", crs)
		if crs == 0 || crs == geoKeyUser {
			what = fmt.Sprintf("a user-defined one (datum EPSG:%d, ellipsoid EPSG:%d)", datum, ellip)
		}
		return d.unsupported(keyField(keyGeographic), "geographic coordinate system is %s, not WGS84 (EPSG:4326); convert with: %s", what, geoTIFFWarpHint)
	}
	if u := key[keyAngularUnits]; u != 0 && u != epsgDegree {
		return d.unsupported(keyField(keyAngularUnits), "angular unit EPSG:%d is not degrees (9102); convert with: %s", u, geoTIFFWarpHint)
	}
	if pm := key[keyPrimeMeridian]; pm != 0 && pm != epsgGreenwich {
		return d.unsupported(keyField(keyPrimeMeridian), "prime meridian EPSG:%d is not Greenwich (8901); convert with: %s", pm, geoTIFFWarpHint)
	}
	// Raster type: pixel-is-area (1) unless the file says pixel-is-point
	// (2) (GeoTIFF 1.1 §7.5.2.2, default area).
	var half float64
	switch rt := key[keyRasterType]; rt {
	case 0, 1:
		half = 0.5
	case 2:
	default:
		return d.bad(keyField(keyRasterType), "GTRasterTypeGeoKey %d, want 1 (area) or 2 (point)", rt)
	}

	// Raster-to-model mapping lon = x0 + i·sx, lat = y0 − j·sy at raster
	// coordinates (i, j), from a tiepoint and scale or from an unrotated
	// ModelTransformation (GeoTIFF 1.1 §7.2–7.4).
	var x0, y0, sx, sy float64
	scale, err := d.doubles(tagPixelScale)
	if err != nil {
		return err
	}
	tie, err := d.doubles(tagTiepoint)
	if err != nil {
		return err
	}
	mat, err := d.doubles(tagTransformation)
	if err != nil {
		return err
	}
	switch {
	case scale != nil && tie != nil:
		if len(scale) < 2 {
			return d.bad(geoTIFFField(tagPixelScale), "%d values, want 3", len(scale))
		}
		if len(tie) < 6 || len(tie)%6 != 0 {
			return d.bad(geoTIFFField(tagTiepoint), "%d values, want 6", len(tie))
		}
		if len(tie) > 6 {
			return d.unsupported(geoTIFFField(tagTiepoint), "%d tiepoints (ground control points) instead of a regular grid; resample with: %s", len(tie)/6, geoTIFFWarpHint)
		}
		sx, sy = scale[0], scale[1]
		x0, y0 = tie[3]-tie[0]*sx, tie[4]+tie[1]*sy
	case mat != nil:
		if len(mat) != 16 {
			return d.bad(geoTIFFField(tagTransformation), "%d values, want 16", len(mat))
		}
		if mat[1] != 0 || mat[4] != 0 {
			return d.unsupported(geoTIFFField(tagTransformation), "the grid is rotated or sheared; resample it north-up with: %s", geoTIFFWarpHint)
		}
		sx, sy, x0, y0 = mat[0], -mat[5], mat[3], mat[7]
	case tie != nil:
		return d.unsupported(geoTIFFField(tagPixelScale), "missing, and tiepoints alone do not define a regular grid; resample with: %s", geoTIFFWarpHint)
	default:
		return d.unsupported(geoTIFFField(tagTiepoint), "the file has no ModelTiepoint/ModelPixelScale or ModelTransformation, so its grid is not georeferenced")
	}
	if sx == 0 || sy == 0 || math.Abs(sx) > 360 || math.Abs(sy) > 180 {
		return d.bad(geoTIFFField(tagPixelScale), "pixel size %g × %g degrees is out of range", sx, sy)
	}
	// Sample centres of the first and last row and column.
	lonA, lonB := x0+half*sx, x0+(float64(g.width-1)+half)*sx
	latA, latB := y0-half*sy, y0-(float64(g.height-1)+half)*sy
	g.dlon, g.dlat = math.Abs(sx), math.Abs(sy)
	g.lon0, g.lat0 = lonA, latA
	if sx < 0 {
		g.flipCols, g.lon0 = true, lonB
	}
	if sy < 0 {
		g.flipRows, g.lat0 = true, latB
	}
	const tol = 1e-6 // degrees; lets grids whose centres reach the poles pass
	south := g.lat0 - float64(g.height-1)*g.dlat
	if g.lat0 > 90+tol || south < -90-tol || math.Abs(g.lon0) > 540 || math.Abs(g.lon0+float64(g.width-1)*g.dlon) > 540 {
		return d.bad(geoTIFFField(tagTiepoint), "sample centres span latitudes %.6f to %.6f, longitudes from %.6f: not WGS84 degrees", south, g.lat0, g.lon0)
	}
	return nil
}

// readNodata reads GDAL's nodata tag, an ASCII number or "nan".
func (g *geoTIFFHeader) readNodata(d *tiffIFD) error {
	e, b, err := d.raw(tagGDALNodata)
	if err != nil || b == nil {
		return err
	}
	if e.typ != 2 {
		return d.bad(geoTIFFField(tagGDALNodata), "field type %d where ASCII (2) is required", e.typ)
	}
	s := strings.TrimSpace(strings.TrimRight(string(b), "\x00"))
	if s == "" {
		return nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return d.bad(geoTIFFField(tagGDALNodata), "%q is not a number", s)
	}
	g.nodata, g.hasNodata = v, true
	return nil
}

// geoTIFFBlockReader decodes blocks, reusing its buffers between them.
type geoTIFFBlockReader struct {
	g   *geoTIFFHeader
	in  []byte // compressed block
	out []byte // decoded block
	zr  io.ReadCloser
	br  bytes.Reader
}

// decode reads every block and stores the samples in h (row-major, north
// row first).
func (g *geoTIFFHeader) decode(h []float32) error {
	br := &geoTIFFBlockReader{g: g}
	across := (g.width + g.blockW - 1) / g.blockW
	for i := range g.offsets {
		x0, y0 := (i%across)*g.blockW, (i/across)*g.blockH
		rows := g.blockH // tiles are padded to full size
		if !g.tiled {
			rows = min(g.blockH, g.height-y0)
		}
		if err := br.block(i, rows); err != nil {
			return err
		}
		br.store(h, x0, y0, rows)
	}
	return nil
}

func (br *geoTIFFBlockReader) bad(i int, format string, a ...any) error {
	g := br.g
	field := "strip"
	if g.tiled {
		field = "tile"
	}
	return &GeoTIFFError{File: g.name, Field: fmt.Sprintf("%s %d", field, i), Msg: fmt.Sprintf(format, a...), Err: ErrBadGeoTIFF}
}

// block reads and decompresses block i of the given rows into br.out.
func (br *geoTIFFBlockReader) block(i, rows int) error {
	g := br.g
	need := uint64(rows) * uint64(g.blockW) * uint64(g.bytesPer)
	n := g.counts[i]
	if need > g.maxExpand(n) {
		return br.bad(i, "%d bytes cannot decode to the %d bytes of a %d×%d block", n, need, g.blockW, rows)
	}
	if uint64(cap(br.in)) < n {
		br.in = make([]byte, n)
	}
	in := br.in[:n]
	if m, err := g.r.ReadAt(in, int64(g.offsets[i])); m < len(in) {
		return br.bad(i, "reading %d bytes at offset %d: %v", n, g.offsets[i], err)
	}
	if uint64(cap(br.out)) < need {
		br.out = make([]byte, need)
	}
	out := br.out[:need]
	switch g.compression {
	case 1:
		if n < need {
			return br.bad(i, "%d bytes of uncompressed data, a %d×%d block needs %d", n, g.blockW, rows, need)
		}
		copy(out, in)
	case 5:
		br.br.Reset(in)
		zr := lzw.NewReader(&br.br, lzw.MSB, 8)
		_, err := io.ReadFull(zr, out)
		zr.Close()
		if err != nil {
			return br.bad(i, "LZW data decode to fewer than %d bytes: %v", need, err)
		}
	case 8, 32946:
		br.br.Reset(in)
		var err error
		if br.zr == nil {
			br.zr, err = zlib.NewReader(&br.br)
		} else {
			err = br.zr.(zlib.Resetter).Reset(&br.br, nil)
		}
		if err == nil {
			_, err = io.ReadFull(br.zr, out)
		}
		if err != nil {
			return br.bad(i, "Deflate data decode to fewer than %d bytes: %v", need, err)
		}
	case 32773:
		if err := unpackBits(out, in); err != nil {
			return br.bad(i, "PackBits: %v", err)
		}
	}
	return nil
}

// unpackBits decodes PackBits data (TIFF 6.0 §9) filling out exactly.
func unpackBits(out, in []byte) error {
	o := 0
	for o < len(out) {
		if len(in) == 0 {
			return fmt.Errorf("data end after %d of %d bytes", o, len(out))
		}
		n := int(int8(in[0]))
		in = in[1:]
		switch {
		case n >= 0: // n+1 literal bytes
			n++
			if n > len(in) || n > len(out)-o {
				return fmt.Errorf("literal run of %d bytes overruns the data", n)
			}
			o += copy(out[o:], in[:n])
			in = in[n:]
		case n != -128: // the next byte 1−n times
			n = 1 - n
			if len(in) == 0 || n > len(out)-o {
				return fmt.Errorf("repeat run of %d bytes overruns the data", n)
			}
			b := in[0]
			in = in[1:]
			for j := range n {
				out[o+j] = b
			}
			o += n
		}
	}
	return nil
}

// store undoes the predictor on the decoded block in br.out and writes its
// samples that fall inside the image into h as float32, NaN for nodata.
func (br *geoTIFFBlockReader) store(h []float32, x0, y0, rows int) {
	g := br.g
	bo := g.bo
	bw := g.blockW
	rowBytes := bw * g.bytesPer
	nx := min(bw, g.width-x0)
	ny := min(rows, g.height-y0)
	nd := g.nodata
	nd32 := float32(nd)
	ndNaN := math.IsNaN(nd)
	for y := range ny {
		row := br.out[y*rowBytes : (y+1)*rowBytes]
		r := y0 + y
		if g.flipRows {
			r = g.height - 1 - r
		}
		dst := h[r*g.width : (r+1)*g.width]
		c0, step := x0, 1
		if g.flipCols {
			c0, step = g.width-1-x0, -1
		}
		switch g.bytesPer {
		case 2:
			var acc uint16
			for x := range nx {
				v := bo.Uint16(row[2*x:])
				if g.predictor == 2 {
					v += acc
					acc = v
				}
				var f float64
				if g.format == 2 {
					f = float64(int16(v))
				} else {
					f = float64(v)
				}
				if g.hasNodata && f == nd {
					f = math.NaN()
				}
				dst[c0+step*x] = float32(f)
			}
		case 4:
			if g.predictor == 3 {
				// Floating-point predictor (Adobe TIFF Technical Note 3,
				// 2005): bytes differenced across the row, then stored as
				// byte planes, most significant first.
				for k := 1; k < rowBytes; k++ {
					row[k] += row[k-1]
				}
				t := row
				for x := range nx {
					bits := uint32(t[x])<<24 | uint32(t[bw+x])<<16 | uint32(t[2*bw+x])<<8 | uint32(t[3*bw+x])
					dst[c0+step*x] = geoTIFFFloat(bits, g.hasNodata, nd32, ndNaN)
				}
				continue
			}
			var acc uint32
			for x := range nx {
				v := bo.Uint32(row[4*x:])
				if g.predictor == 2 {
					v += acc
					acc = v
				}
				dst[c0+step*x] = geoTIFFFloat(v, g.hasNodata, nd32, ndNaN)
			}
		}
	}
}

func geoTIFFFloat(bits uint32, hasNodata bool, nd float32, ndNaN bool) float32 {
	f := math.Float32frombits(bits)
	if hasNodata && !ndNaN && f == nd {
		return float32(math.NaN())
	}
	return f
}
