package simcam

import (
	"math"
	"sync"
)

// opticsKind selects the renderer's per-pixel PSF path.
type opticsKind int

const (
	fixedGauss opticsKind = iota // one Gaussian PSF everywhere: all per-edge constants
	fieldGauss                   // FieldLens without diffraction: Gaussian, per-pixel covariance
	generic                      // any other lens: PSFAt per pixel
)

// nodeCell is the cell size (px) over which a non-Gaussian, field-varying
// lens shares one corner quadrature rule (built for the PSF at the cell's
// centre).
const nodeCell = 64

// optics wraps a Lens for the renderer.
type optics struct {
	kind       opticsKind
	lens       Lens
	fixed      bool // same PSF everywhere
	fixedPSF   PSF
	fixedCov   cov
	fixedNodes nodeSet
	field      FieldLens
	maxSupport float64 // largest PSF support over the frame, px

	mu        sync.Mutex
	nodeCache map[[2]int]*nodeSet
	tabCache  map[[2]float64]*edgeTable
}

func newOptics(l Lens, w, h int) *optics {
	o := &optics{lens: l, kind: generic, nodeCache: map[[2]int]*nodeSet{}, tabCache: map[[2]float64]*edgeTable{}}
	var psf PSF
	switch f := l.(type) {
	case Fixed:
		psf = f.PSF
		o.fixed = true
	case *Fixed:
		psf = f.PSF
		o.fixed = true
	case FieldLens:
		o.field = f
	case *FieldLens:
		o.field = *f
	}
	if o.fixed {
		if psf == nil {
			psf = Gaussian{}
		}
		o.fixedPSF = psf
		o.maxSupport = psf.Support()
		if c, ok := gaussCov(psf); ok {
			o.kind = fixedGauss
			o.fixedCov = c
			gaussNodes(&o.fixedNodes, c)
		}
		return o
	}
	if o.field.PitchUM != 0 && o.field.Diffraction == nil {
		if _, ok := l.(FieldLens); ok {
			o.kind = fieldGauss
		} else if _, ok := l.(*FieldLens); ok {
			o.kind = fieldGauss
		}
	}
	// Largest support over the frame, sampled on a 17 x 17 grid plus the
	// optical centre, with 5 % margin (widths are assumed to vary smoothly).
	sup := 0.0
	const n = 16
	for j := 0; j <= n; j++ {
		for i := 0; i <= n; i++ {
			sup = math.Max(sup, l.PSFAt(float64(w*i)/n, float64(h*j)/n).Support())
		}
	}
	if o.kind == fieldGauss {
		sup = math.Max(sup, o.field.PSFAt(o.field.CentreX, o.field.CentreY).Support())
	}
	o.maxSupport = 1.05 * sup
	return o
}

// local returns the PSF at (x, y): its covariance if it is Gaussian, else
// the PSF itself.
func (o *optics) local(x, y float64) (c cov, gauss bool, psf PSF) {
	switch o.kind {
	case fixedGauss:
		return o.fixedCov, true, nil
	case fieldGauss:
		return o.field.covAt(x, y), true, nil
	}
	psf = o.fixedPSF
	if !o.fixed {
		psf = o.lens.PSFAt(x, y)
	}
	c, gauss = gaussCov(psf)
	return c, gauss, psf
}

// gaussRMax returns the largest Gauss-Hermite node radius for covariance c.
func gaussRMax(c cov) float64 {
	l := (c[0]+c[2])/2 + math.Hypot((c[0]-c[2])/2, c[1])
	s1 := math.Sqrt(math.Max(l, 0))
	if s1 <= 1e-12 {
		return 0
	}
	return s1 * stdNodes.zmax
}

// gridNodes returns the corner quadrature rule for a non-Gaussian PSF near
// (x, y): one rule for a fixed lens, else one per nodeCell cell.
func (o *optics) gridNodes(x, y float64) *nodeSet {
	key := [2]int{}
	if !o.fixed {
		key = [2]int{int(math.Floor(x / nodeCell)), int(math.Floor(y / nodeCell))}
	}
	o.mu.Lock()
	ns, ok := o.nodeCache[key]
	o.mu.Unlock()
	if ok {
		return ns
	}
	psf := o.fixedPSF
	if !o.fixed {
		psf = o.lens.PSFAt((float64(key[0])+0.5)*nodeCell, (float64(key[1])+0.5)*nodeCell)
	}
	ns = newGridNodes(psf)
	o.mu.Lock()
	if old, ok := o.nodeCache[key]; ok {
		ns = old // built concurrently: keep one (both are identical)
	} else {
		o.nodeCache[key] = ns
	}
	o.mu.Unlock()
	return ns
}

// table returns edge e's tabulated profile for a non-Gaussian PSF: shared by
// edges of equal normal for a fixed lens, else built for the PSF at the
// edge's midpoint (the documented approximation for non-Gaussian field
// lenses).
func (r *renderer) table(e *redge) *edgeTable {
	e.lazy.once.Do(func() {
		o := r.opt
		if !o.fixed {
			psf := o.lens.PSFAt((e.a[0]+e.b[0])/2, (e.a[1]+e.b[1])/2)
			e.lazy.tab = newEdgeTable(psf, e.nx, e.ny, r.rinf)
			return
		}
		key := [2]float64{e.nx, e.ny}
		o.mu.Lock()
		t, ok := o.tabCache[key]
		o.mu.Unlock()
		if !ok {
			t = newEdgeTable(o.fixedPSF, e.nx, e.ny, r.rinf)
			o.mu.Lock()
			if old, ok := o.tabCache[key]; ok {
				t = old
			} else {
				o.tabCache[key] = t
			}
			o.mu.Unlock()
		}
		e.lazy.tab = t
	})
	return e.lazy.tab
}
