package simcam

import "math"

// levelEps is the distance (px) from an edge line at which the levels on
// its two sides are sampled.
const levelEps = 1e-6

// pixel renders the pixel centred at (cx, cy), whose influence disc meets the
// edges ws.cand.
func (r *renderer) pixel(ws *worker, cx, cy float64) float64 {
	best, bd := -1, math.Inf(1)
	var bu, bt float64
	ws.dist = ws.dist[:0]
	for _, k := range ws.cand {
		e := &r.edges[k]
		px, py := cx-e.a[0], cy-e.a[1]
		t := px*e.dx + py*e.dy
		u := px*e.nx + py*e.ny
		var d float64
		switch {
		case t < 0:
			d = math.Hypot(px, py)
		case t > e.length:
			d = math.Hypot(cx-e.b[0], cy-e.b[1])
		default:
			d = math.Abs(u)
		}
		ws.dist = append(ws.dist, d)
		if d < bd {
			best, bd, bu, bt = int(k), d, u, t
		}
	}
	if bd > r.rinf {
		return r.level(cx, cy)
	}
	e := &r.edges[best]

	// rho: distance to the nearest feature other than the nearest edge's
	// segment (other edges, and the extensions of its line beyond its ends).
	// Within rho the scene equals the edge's half-plane model.
	rho := r.rinf
	for i, k := range ws.cand {
		if int(k) != best {
			rho = math.Min(rho, ws.dist[i])
		}
	}
	if bt <= 0 {
		rho = math.Min(rho, math.Abs(bu))
	} else {
		rho = math.Min(rho, math.Hypot(cx-e.a[0], cy-e.a[1]))
	}
	if bt >= e.length {
		rho = math.Min(rho, math.Abs(bu))
	} else {
		rho = math.Min(rho, math.Hypot(cx-e.b[0], cy-e.b[1]))
	}

	// Levels on the two sides of the line, as seen from the pixel centre.
	fx, fy := cx-bu*e.nx, cy-bu*e.ny
	var lpos, lneg float64
	if math.Abs(bu) > levelEps {
		lc := r.level(cx, cy)
		if bu > 0 {
			lpos, lneg = lc, r.level(fx-levelEps*e.nx, fy-levelEps*e.ny)
		} else {
			lneg, lpos = lc, r.level(fx+levelEps*e.nx, fy+levelEps*e.ny)
		}
	} else {
		lpos = r.level(fx+levelEps*e.nx, fy+levelEps*e.ny)
		lneg = r.level(fx-levelEps*e.nx, fy-levelEps*e.ny)
	}

	c, gauss, _ := r.opt.local(cx, cy)
	var f, rmax float64
	if gauss {
		s := e.sn
		if r.opt.kind != fixedGauss {
			s = math.Sqrt(math.Max(c.along(e.nx, e.ny), 0))
		}
		f = gaussEdge(bu, s, e.pw, e.pb)
		rmax = gaussRMax(c)
		if r.opt.kind == fixedGauss {
			rmax = r.opt.fixedNodes.RMax
		}
	} else {
		f = r.table(e).eval(bu)
		rmax = r.opt.gridNodes(cx, cy).RMax
	}
	val := lneg + (lpos-lneg)*f
	if r.forceCorner {
		rho = 0
	} else if rho >= rmax+halfDiag || e.rough {
		return val
	}
	return val + r.cornerCorrection(ws, cx, cy, e, bu, lneg, lpos, rho, c, gauss, rmax)
}

// cornerCorrection returns sum_k w_k (A_true(o_k) - A_edge(o_k)) over the
// PSF quadrature nodes o_k that can reach beyond the disc of radius rho in
// which the scene equals the nearest edge's half-plane model.
func (r *renderer) cornerCorrection(ws *worker, cx, cy float64, e *redge, u, lneg, lpos, rho float64, c cov, gauss bool, rmax float64) float64 {
	var ns *nodeSet
	switch {
	case gauss && r.opt.kind == fixedGauss:
		ns = &r.opt.fixedNodes
	case gauss:
		gaussNodes(&ws.nodes, c)
		ns = &ws.nodes
	default:
		ns = r.opt.gridNodes(cx, cy)
	}
	r.gatherPieces(ws, cx, cy, rmax+0.5)
	thr := rho - halfDiag
	thr2 := thr * thr
	if thr < 0 {
		thr2 = -1
	}
	corr := 0.0
	for k, w := range ns.W {
		ox, oy := ns.X[k], ns.Y[k]
		if ox*ox+oy*oy < thr2 {
			continue
		}
		ws.sq = squareAt(ws.sq, cx+ox, cy+oy)
		at := r.integrate(ws, ws.sq, len(ws.pieces), 0)
		am := lneg + (lpos-lneg)*trapCDF(u+ox*e.nx+oy*e.ny, e.pw, e.pb)
		corr += w * (at - am)
	}
	return corr
}

// gatherPieces collects into ws.pieces, in paint order, the convex pieces
// whose boxes meet the square of half-size rad around (cx, cy).
func (r *renderer) gatherPieces(ws *worker, cx, cy, rad float64) {
	ws.pieces = ws.pieces[:0]
	box := bbox{cx - rad, cy - rad, cx + rad, cy + rad}
	i0, j0 := r.qgrid.cellXY(box.X0, box.Y0)
	i1, j1 := r.qgrid.cellXY(box.X1, box.Y1)
	for j := j0; j <= j1; j++ {
		for i := i0; i <= i1; i++ {
			for _, id := range r.qgrid.cells[j*r.qgrid.nx+i] {
				if r.pieces[id].box.overlaps(box) {
					ws.pieces = append(ws.pieces, id)
				}
			}
		}
	}
	if i1 > i0 || j1 > j0 {
		sortUnique(&ws.pieces)
	}
}

func sortUnique(s *[]int32) {
	a := *s
	for i := 1; i < len(a); i++ { // insertion sort: lists are short
		for j := i; j > 0 && a[j] < a[j-1]; j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
	out := a[:0]
	for i, v := range a {
		if i == 0 || v != a[i-1] {
			out = append(out, v)
		}
	}
	*s = out
}

// integrate returns the integral of the painted level over the convex
// region R (positive orientation), painting pieces ws.pieces[:n] over the
// background. With P the last piece and f_k the image after painting k
// pieces: int_R f_n = int_R f_{n-1} + L_P |R n P| - int_{R n P} f_{n-1},
// where R n P is convex again (both are convex).
func (r *renderer) integrate(ws *worker, reg []vec, n, depth int) float64 {
	rb := boxOf(reg)
	for n > 0 {
		n--
		p := &r.pieces[ws.pieces[n]]
		if !rb.overlaps(p.box) {
			continue
		}
		dst, tmp := ws.clipBufs(depth)
		cl := clipConvex(dst, tmp, reg, p.pts)
		ws.bufs[depth][0] = cl[:0] // keep any grown buffer
		ac := polyArea(cl)
		if ac <= 0 {
			continue
		}
		ar := polyArea(reg)
		if ar-ac <= 1e-13*ar {
			return p.level * ar
		}
		below := r.integrate(ws, reg, n, depth+1)
		return below + p.level*ac - r.integrate(ws, cl, n, depth+1)
	}
	return r.bg * polyArea(reg)
}
