// Package plane holds linear-light float32 image planes, the one pixel type
// every measurement in Sagitta reads.
//
// Conventions (used throughout Sagitta): x grows to the right, y grows down.
// Pixel (i, j) covers the unit square [i, i+1) x [j, j+1) in continuous image
// coordinates, so its centre is at (i+0.5, j+0.5) and the centre of a W x H
// image is (W/2, H/2). Values are linear light scaled so that the file's
// full-scale code value is 1 (see Clipped).
package plane

import "fmt"

// Plane is a row-major image of linear-light samples: Pix[y*W+x].
type Plane struct {
	W, H int
	Pix  []float32
}

// ClipLevel is the linear value at or above which a sample counts as clipped
// (the file's largest code value decodes to exactly 1).
const ClipLevel = 0.999

// New returns a zeroed w x h plane. It panics if w or h is negative
// (a programmer error; decoders check image sizes before calling it).
func New(w, h int) *Plane {
	if w < 0 || h < 0 {
		panic(fmt.Sprintf("plane: negative size %dx%d", w, h))
	}
	return &Plane{W: w, H: h, Pix: make([]float32, w*h)}
}

// At returns the sample at pixel (x, y); it panics outside the plane.
func (p *Plane) At(x, y int) float32 { return p.Pix[y*p.W+x] }

// Set stores v at pixel (x, y); it panics outside the plane.
func (p *Plane) Set(x, y int, v float32) { p.Pix[y*p.W+x] = v }

// In reports whether pixel (x, y) lies inside the plane.
func (p *Plane) In(x, y int) bool { return x >= 0 && y >= 0 && x < p.W && y < p.H }

// Bilinear samples the plane at continuous coordinates (x, y) (pixel centres
// at half-integers), clamping at the borders.
func (p *Plane) Bilinear(x, y float64) float64 {
	fx, fy := x-0.5, y-0.5
	x0, y0 := int(floor(fx)), int(floor(fy))
	ax, ay := fx-float64(x0), fy-float64(y0)
	v00 := float64(p.clampAt(x0, y0))
	v10 := float64(p.clampAt(x0+1, y0))
	v01 := float64(p.clampAt(x0, y0+1))
	v11 := float64(p.clampAt(x0+1, y0+1))
	return (v00*(1-ax)+v10*ax)*(1-ay) + (v01*(1-ax)+v11*ax)*ay
}

func (p *Plane) clampAt(x, y int) float32 {
	x = min(max(x, 0), p.W-1)
	y = min(max(y, 0), p.H-1)
	return p.Pix[y*p.W+x]
}

func floor(v float64) float64 {
	i := float64(int(v))
	if i > v {
		return i - 1
	}
	return i
}
