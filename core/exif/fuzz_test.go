package exif

import (
	"errors"
	"math"
	"testing"
)

// FuzzParse feeds arbitrary bytes to Parse and ReadJPEG. Neither may panic;
// errors must be FormatErrors; tags that were read must survive
// Encode -> Parse with their strings and integers intact.
func FuzzParse(f *testing.F) {
	f.Add(bigEndianBlock)
	f.Add(littleEndianBlock)
	f.Add(Encode(Tags{Make: "Sagitta", Model: "Sagitta Simulated Camera", Orientation: 3, FNumber: 4,
		ExposureTimeS: 0.01, ISO: 100, FocalPlaneXRes: 4000, FocalPlaneResUnit: UnitCentimetre})[6:])
	f.Add(Encode(Tags{LensModel: "Sagitta Sim 85mm", ExposureBiasEV: -1})[6:])
	if j, err := InsertJPEG([]byte{0xFF, 0xD8, 0xFF, 0xD9}, Tags{Make: "Sagitta"}); err == nil {
		f.Add(j)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if _, err := ReadJPEG(data); err != nil {
			var fe FormatError
			if !errors.As(err, &fe) {
				t.Fatalf("ReadJPEG: error %T %v", err, err)
			}
		}
		tags, err := Parse(data)
		if err != nil {
			var fe FormatError
			if !errors.As(err, &fe) {
				t.Fatalf("Parse: error %T %v", err, err)
			}
			return
		}
		if p, ok := tags.PixelPitchUM(); ok && (math.IsNaN(p) || math.IsInf(p, 0) || p <= 0) {
			t.Fatalf("pixel pitch %v from %+v", p, tags)
		}
		again, err := Parse(Encode(tags)[6:])
		if err != nil {
			t.Fatalf("re-parse of Encode(%+v): %v", tags, err)
		}
		clampShort := func(v int) int { return min(v, math.MaxUint16) }
		if again.Make != tags.Make || again.Model != tags.Model || again.LensModel != tags.LensModel ||
			again.Orientation != tags.Orientation || again.ISO != clampShort(tags.ISO) ||
			again.FocalLength35MM != clampShort(tags.FocalLength35MM) ||
			again.FocalPlaneResUnit != tags.FocalPlaneResUnit {
			t.Fatalf("round trip changed tags:\n%+v\n%+v", tags, again)
		}
	})
}
