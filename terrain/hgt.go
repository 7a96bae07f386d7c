package terrain

import (
	"archive/zip"
	"bufio"
	"compress/gzip"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
)

// ErrHGT is wrapped by every error about an SRTM HGT file that cannot be
// read: a name that does not give the tile position, a wrong or truncated
// size, a broken zip or gzip container. Test with errors.Is.
var ErrHGT = errors.New("bad hgt file")

// HGT grid sizes and the void marker (NASA/USGS SRTM documentation, SRTM
// Topography, 2003, §2).
const (
	// HGTVoid is the int16 value marking a sample with no data.
	HGTVoid = -32768
	// HGTSamples3 is the row and column count of a 3″ tile.
	HGTSamples3 = 1201
	// HGTSamples1 is the row and column count of a 1″ tile.
	HGTSamples1 = 3601
	// HGTBytes3 is the size in bytes of a 3″ tile: 1201² big-endian int16.
	HGTBytes3 = HGTSamples3 * HGTSamples3 * 2
	// HGTBytes1 is the size in bytes of a 1″ tile: 3601² big-endian int16.
	HGTBytes1 = HGTSamples1 * HGTSamples1 * 2
)

// ParseHGTName reads the tile position from an SRTM file name such as
// "N45E007.hgt", "s01w072.hgt.gz" or "N45E007.SRTMGL1.hgt.zip" (case does
// not matter; a directory part is ignored). lat and lon are the whole
// degrees of the tile's south-west corner: N45E007 covers 45–46°N, 7–8°E;
// S01W072 covers 1–0°S, 72–71°W. ok is false when the name does not start
// with the [NS]dd[EW]ddd pattern, the degrees are out of range, or the name
// does not end in .hgt, .hgt.zip or .hgt.gz.
func ParseHGTName(name string) (lat, lon int, ok bool) {
	base := strings.ToLower(filepath.Base(name))
	if !hasHGTSuffix(base) || len(base) < 7 {
		return 0, 0, false
	}
	digits := func(s string) (int, bool) {
		v := 0
		for i := 0; i < len(s); i++ {
			if s[i] < '0' || s[i] > '9' {
				return 0, false
			}
			v = v*10 + int(s[i]-'0')
		}
		return v, true
	}
	la, ok1 := digits(base[1:3])
	lo, ok2 := digits(base[4:7])
	if !ok1 || !ok2 {
		return 0, 0, false
	}
	switch base[0] {
	case 'n':
	case 's':
		la = -la
	default:
		return 0, 0, false
	}
	switch base[3] {
	case 'e':
	case 'w':
		lo = -lo
	default:
		return 0, 0, false
	}
	// The name must continue with a dot right after the position.
	if len(base) > 7 && base[7] != '.' {
		return 0, 0, false
	}
	if la < -90 || la > 89 || lo < -180 || lo > 179 {
		return 0, 0, false
	}
	return la, lo, true
}

// hasHGTSuffix reports whether a lower-case base name ends in one of the
// HGT extensions this package reads.
func hasHGTSuffix(lower string) bool {
	return strings.HasSuffix(lower, ".hgt") || strings.HasSuffix(lower, ".hgt.zip") ||
		strings.HasSuffix(lower, ".hgt.gz")
}

// HGTName returns the conventional file name of the SRTM tile whose
// south-west corner is at (lat, lon) whole degrees, e.g. HGTName(45, 7) =
// "N45E007.hgt" and HGTName(-1, -72) = "S01W072.hgt".
func HGTName(lat, lon int) string {
	ns, ew := 'N', 'E'
	if lat < 0 {
		ns, lat = 'S', -lat
	}
	if lon < 0 {
		ew, lon = 'W', -lon
	}
	return fmt.Sprintf("%c%02d%c%03d.hgt", ns, lat, ew, lon)
}

// hgtSamples returns the row/column count for a raw HGT byte size, or 0.
func hgtSamples(size int64) int {
	switch size {
	case HGTBytes3:
		return HGTSamples3
	case HGTBytes1:
		return HGTSamples1
	}
	return 0
}

// DecodeHGT decodes a raw SRTM HGT grid (big-endian int16, row-major from
// the north edge, west to east; SRTM documentation §2) read from r. name
// is the file name the position is read from (see ParseHGTName) and is kept
// as the tile's Name. size is the byte count the caller expects, from the
// file size or a zip header, or −1 when unknown (gzip): the grid size is
// then taken from the bytes actually read. Only 1201² (3″) and 3601² (1″)
// grids are accepted. Voids (−32768) become NaN and are then filled from
// valid neighbours (see Tile.FillVoids). A height outside
// MinPlausibleM…MaxPlausibleM marks a corrupt file and is refused with an
// error wrapping ErrImplausibleHeight. Errors wrap ErrHGT.
func DecodeHGT(r io.Reader, name string, size int64) (*Tile, error) {
	return decodeHGT(r, filepath.Base(name), name, size)
}

// decodeHGT is DecodeHGT with the position read from base and errors
// naming label (the path, or archive and member).
func decodeHGT(r io.Reader, base, label string, size int64) (*Tile, error) {
	name := label
	lat, lon, ok := ParseHGTName(base)
	if !ok {
		return nil, fmt.Errorf("%s: %w: name does not give the tile position; rename it like N45E007.hgt", name, ErrHGT)
	}
	var buf []byte
	if size >= 0 {
		if hgtSamples(size) == 0 {
			return nil, hgtSizeError(name, size)
		}
		buf = make([]byte, size)
		n, err := io.ReadFull(r, buf)
		if err != nil {
			if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) {
				return nil, fmt.Errorf("%s: %w: truncated: read %d bytes, expected %d; fetch the tile again", name, ErrHGT, n, size)
			}
			return nil, fmt.Errorf("%s: %w: %w", name, ErrHGT, err)
		}
	} else {
		var err error
		buf, err = io.ReadAll(io.LimitReader(r, HGTBytes1+1))
		if err != nil {
			return nil, fmt.Errorf("%s: %w: %w", name, ErrHGT, err)
		}
		if hgtSamples(int64(len(buf))) == 0 {
			return nil, hgtSizeError(name, int64(len(buf)))
		}
	}
	t := hgtTile(buf, hgtSamples(int64(len(buf))), lat, lon, base)
	if err := t.checkHeights(); err != nil {
		return nil, fmt.Errorf("%s: %w: %w", name, ErrHGT, err)
	}
	return t, nil
}

// hgtTile builds the tile from n×n big-endian int16 samples in buf (SRTM
// layout) for the tile with south-west corner (lat, lon) whole degrees, and
// fills its voids.
func hgtTile(buf []byte, n, lat, lon int, name string) *Tile {
	t := &Tile{
		Name: name,
		Rows: n, Cols: n,
		Lat0: float64(lat + 1), Lon0: float64(lon),
		H: make([]float32, n*n),
	}
	if n > 1 {
		t.DLat, t.DLon = 1/float64(n-1), 1/float64(n-1)
	}
	nan := float32(math.NaN())
	for i := range t.H {
		v := int16(binary.BigEndian.Uint16(buf[2*i:]))
		if v == HGTVoid {
			t.H[i] = nan
			continue
		}
		t.H[i] = float32(v)
	}
	t.FillVoids()
	return t
}

func hgtSizeError(name string, size int64) error {
	return fmt.Errorf("%s: %w: size %d bytes, expected %d (3″, 1201×1201) or %d (1″, 3601×3601); the file is truncated or not an SRTM tile",
		name, ErrHGT, size, HGTBytes3, HGTBytes1)
}

// ReadHGT reads an SRTM HGT tile from a plain .hgt file, a .hgt.gz file or
// a .hgt.zip archive (the first member ending in .hgt, whatever its name,
// e.g. N45E007.hgt inside N45E007.SRTMGL1.hgt.zip). File names may be in
// either case. The tile position comes from the file name (ParseHGTName);
// for zip archives it comes from the outer name, the inner name only being
// used when the outer one gives no position. Errors wrap ErrHGT or the
// os error.
func ReadHGT(path string) (*Tile, error) {
	base := filepath.Base(path)
	lower := strings.ToLower(base)
	switch {
	case strings.HasSuffix(lower, ".zip"):
		return readHGTZip(path)
	case strings.HasSuffix(lower, ".gz"):
		f, err := os.Open(path)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		zr, err := gzip.NewReader(bufio.NewReader(f))
		if err != nil {
			return nil, fmt.Errorf("%s: %w: not a gzip file: %w", path, ErrHGT, err)
		}
		t, err := decodeHGT(zr, base, path, -1)
		if err != nil {
			return nil, err
		}
		// A tile that decoded to the right size must still end cleanly;
		// reading on checks the gzip checksum and trailing data.
		if _, err := io.Copy(io.Discard, zr); err != nil {
			return nil, fmt.Errorf("%s: %w: gzip stream: %w", path, ErrHGT, err)
		}
		return t, nil
	default:
		f, err := os.Open(path)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		fi, err := f.Stat()
		if err != nil {
			return nil, err
		}
		return decodeHGT(bufio.NewReaderSize(f, 1<<16), base, path, fi.Size())
	}
}

// readHGTZip reads the first .hgt member of a zip archive.
func readHGTZip(path string) (*Tile, error) {
	zr, err := zip.OpenReader(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %w: not a zip archive: %w", path, ErrHGT, err)
	}
	defer zr.Close()
	base := filepath.Base(path)
	for _, zf := range zr.File {
		if !strings.HasSuffix(strings.ToLower(zf.Name), ".hgt") {
			continue
		}
		name := base
		if _, _, ok := ParseHGTName(base); !ok {
			name = filepath.Base(zf.Name)
		}
		rc, err := zf.Open()
		if err != nil {
			return nil, fmt.Errorf("%s: %w: member %s: %w", path, ErrHGT, zf.Name, err)
		}
		defer rc.Close()
		t, err := decodeHGT(bufio.NewReaderSize(rc, 1<<16), name, path+" (member "+zf.Name+")", int64(zf.UncompressedSize64))
		if err != nil {
			return nil, err
		}
		// Drain to let the zip reader verify the CRC.
		if _, err := io.Copy(io.Discard, rc); err != nil {
			return nil, fmt.Errorf("%s: %w: member %s: %w", path, ErrHGT, zf.Name, err)
		}
		t.Name = base
		return t, nil
	}
	return nil, fmt.Errorf("%s: %w: no .hgt member in the zip archive", path, ErrHGT)
}

// hgtRawSize returns the uncompressed byte size of the HGT grid in path
// without decoding it: the file size, the zip member's header size, or the
// gzip trailer's ISIZE field (RFC 1952 §2.3.1). It returns −1 when the size
// cannot be told cheaply.
func hgtRawSize(path string) int64 {
	lower := strings.ToLower(path)
	switch {
	case strings.HasSuffix(lower, ".zip"):
		zr, err := zip.OpenReader(path)
		if err != nil {
			return -1
		}
		defer zr.Close()
		for _, zf := range zr.File {
			if strings.HasSuffix(strings.ToLower(zf.Name), ".hgt") {
				return int64(zf.UncompressedSize64)
			}
		}
		return -1
	case strings.HasSuffix(lower, ".gz"):
		f, err := os.Open(path)
		if err != nil {
			return -1
		}
		defer f.Close()
		fi, err := f.Stat()
		if err != nil || fi.Size() < 18 {
			return -1
		}
		var b [4]byte
		if _, err := f.ReadAt(b[:], fi.Size()-4); err != nil {
			return -1
		}
		return int64(binary.LittleEndian.Uint32(b[:]))
	default:
		fi, err := os.Stat(path)
		if err != nil {
			return -1
		}
		return fi.Size()
	}
}
