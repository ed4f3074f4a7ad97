package exif

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

func TestEncodeRoundTrip(t *testing.T) {
	tests := []struct {
		name string
		in   Tags
	}{
		{"empty", Tags{}},
		{"full", Tags{
			Make: "Sagitta", Model: "Sagitta Simulated Camera", LensModel: "Sagitta Sim 35mm f/2",
			Orientation: 8, ExposureTimeS: 1.0 / 250, FNumber: 2.8, ExposureBiasEV: -1.0 / 3,
			FocalLengthMM: 35, FocalLength35MM: 52, ISO: 200,
			FocalPlaneXRes: 25400 / 4.35, FocalPlaneYRes: 25400 / 4.35, FocalPlaneResUnit: UnitInch,
		}},
		{"IFD0 only fields", Tags{Make: "S", Orientation: 1}},
		{"positive bias, mm unit", Tags{ExposureBiasEV: 0.7, FocalPlaneXRes: 222.2, FocalPlaneResUnit: UnitMillimetre}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b := Encode(tc.in)
			if !bytes.HasPrefix(b, []byte("Exif\x00\x00II*\x00\x08\x00\x00\x00")) {
				t.Fatalf("header % x", b[:min(len(b), 14)])
			}
			got, err := Parse(b[6:])
			if err != nil {
				t.Fatal(err)
			}
			// RATIONAL with denominator <= 1e6: relative error well below 1e-9
			// for these values (best rational approximation).
			if !tagsClose(got, tc.in, 1e-9) {
				t.Errorf("got  %+v\nwant %+v", got, tc.in)
			}
		})
	}
}

func TestEncodeClamps(t *testing.T) {
	long := strings.Repeat("x", 400)
	got := mustParse(t, Encode(Tags{ISO: 102400, LensModel: long, Orientation: 12})[6:])
	// CIPA DC-008: ISO of 65535 or more is recorded as 65535 (from memory).
	if got.ISO != 65535 || got.LensModel != long[:MaxString] || got.Orientation != 0 {
		t.Errorf("got %+v", got)
	}
}

func TestRational(t *testing.T) {
	tests := []struct {
		name     string
		in       float64
		num, den uint32
	}{
		{"1/250 s", 1.0 / 250, 1, 250},
		{"f/5.6", 5.6, 28, 5},
		{"integer", 50, 50, 1},
		// Convergent of pi with the largest denominator <= 1e6: the convergents
		// run 22/7, 333/106, 355/113, ..., 833719/265381, 1146408/364913,
		// 4272943/1360120 (OEIS A002485 / A002486, from memory).
		{"pi", math.Pi, 1146408, 364913},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n, d := rational(tc.in)
			if n != tc.num || d != tc.den {
				t.Errorf("rational(%v) = %d/%d, want %d/%d", tc.in, n, d, tc.num, tc.den)
			}
		})
	}
}

func TestInsertJPEGRejects(t *testing.T) {
	if _, err := InsertJPEG([]byte("PNG"), Tags{}); err == nil {
		t.Error("want error for non-JPEG")
	}
}
