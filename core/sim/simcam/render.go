package simcam

import (
	"math"
	"slices"
	"sync"

	"sagitta/core/internal/parallel"
	"sagitta/core/plane"
)

// halfDiag is half the diagonal of a unit pixel, px: the farthest a point of
// a pixel lies from its centre.
const halfDiag = 0.7071067811865476

// bandRows is the height (rows) of the row bands used to index edges and to
// hand work to goroutines.
const bandRows = 16

// gridCell is the cell size (px) of the spatial index of polygons.
const gridCell = 64

// renderer holds a scene prepared for rendering: polygons split into convex
// pieces, edges indexed by row band, polygons indexed by grid cell.
type renderer struct {
	w, h   int
	bg     float64
	polys  []rpoly
	pieces []rpoly
	edges  []redge
	rinf   float64   // influence radius of an edge: max PSF support + halfDiag
	bands  [][]int32 // edges whose influence reaches each band of rows
	pgrid  grid      // polygons
	qgrid  grid      // convex pieces
	opt    *optics

	forceCorner bool // tests: evaluate the corner correction over all nodes
}

// rpoly is a prepared polygon or convex piece.
type rpoly struct {
	pts   []vec
	box   bbox
	level float64
}

// redge is a prepared polygon edge from a to b with unit direction (dx, dy),
// unit normal (nx, ny) = (-dy, dx), and the pixel's projected widths along the
// normal pw >= pb.
type redge struct {
	a, b           vec
	dx, dy, nx, ny float64
	length         float64
	pw, pb         float64
	sn             float64    // Gaussian sigma along the normal (fixed Gaussian lens)
	rough          bool       // of a Rough polygon: no corner correction
	lazy           *lazyTable // non-Gaussian edge profile, built on first use
}

// lazyTable is an edge table built once, by the first goroutine needing it.
type lazyTable struct {
	once sync.Once
	tab  *edgeTable
}

// grid is a uniform spatial index: each cell lists the items whose bounding
// boxes overlap it, in ascending order; points outside map to border cells.
type grid struct {
	x0, y0 float64
	nx, ny int
	cells  [][]int32
}

func newGrid(x0, y0, x1, y1 float64) grid {
	g := grid{x0: x0, y0: y0}
	g.nx = max(1, int(math.Ceil((x1-x0)/gridCell)))
	g.ny = max(1, int(math.Ceil((y1-y0)/gridCell)))
	g.cells = make([][]int32, g.nx*g.ny)
	return g
}

func (g *grid) cellXY(x, y float64) (int, int) {
	i := int(math.Floor((x - g.x0) / gridCell))
	j := int(math.Floor((y - g.y0) / gridCell))
	return min(max(i, 0), g.nx-1), min(max(j, 0), g.ny-1)
}

func (g *grid) add(id int32, b bbox) {
	i0, j0 := g.cellXY(b.X0, b.Y0)
	i1, j1 := g.cellXY(b.X1, b.Y1)
	for j := j0; j <= j1; j++ {
		for i := i0; i <= i1; i++ {
			g.cells[j*g.nx+i] = append(g.cells[j*g.nx+i], id)
		}
	}
}

func (g *grid) at(x, y float64) []int32 {
	i, j := g.cellXY(x, y)
	return g.cells[j*g.nx+i]
}

// newRenderer prepares scene s for a w x h frame through optics o.
func newRenderer(w, h int, s Scene, o *optics) *renderer {
	r := &renderer{w: w, h: h, bg: s.Background, opt: o}
	r.rinf = o.maxSupport + halfDiag + 1e-9
	m := r.rinf + 1
	r.pgrid = newGrid(-m, -m, float64(w)+m, float64(h)+m)
	r.qgrid = newGrid(-m, -m, float64(w)+m, float64(h)+m)
	frame := bbox{-r.rinf, -r.rinf, float64(w) + r.rinf, float64(h) + r.rinf}
	for _, p := range s.Polygons {
		pts := dedupe(p.Pts)
		if len(pts) < 3 {
			continue
		}
		rp := rpoly{pts: pts, box: boxOf(pts), level: p.Level}
		r.pgrid.add(int32(len(r.polys)), rp.box)
		r.polys = append(r.polys, rp)
		for _, q := range convexPieces(pts) {
			rq := rpoly{pts: q, box: boxOf(q), level: p.Level}
			r.qgrid.add(int32(len(r.pieces)), rq.box)
			r.pieces = append(r.pieces, rq)
		}
		for i := range pts {
			a, b := pts[i], pts[(i+1)%len(pts)]
			e := redge{a: a, b: b, lazy: &lazyTable{}, rough: p.Rough}
			e.length = math.Hypot(b[0]-a[0], b[1]-a[1])
			if e.length == 0 {
				continue
			}
			eb := boxOf([]vec{a, b})
			if !eb.overlaps(frame) {
				continue
			}
			e.dx, e.dy = (b[0]-a[0])/e.length, (b[1]-a[1])/e.length
			e.nx, e.ny = -e.dy, e.dx
			c, sn := math.Abs(e.nx), math.Abs(e.ny)
			e.pw, e.pb = math.Max(c, sn), math.Min(c, sn)
			if o.kind == fixedGauss {
				e.sn = math.Sqrt(math.Max(o.fixedCov.along(e.nx, e.ny), 0))
			}
			r.edges = append(r.edges, e)
		}
	}
	nb := (h + bandRows - 1) / bandRows
	r.bands = make([][]int32, nb)
	for k := range r.edges {
		e := &r.edges[k]
		y0 := math.Min(e.a[1], e.b[1]) - r.rinf
		y1 := math.Max(e.a[1], e.b[1]) + r.rinf
		j0 := max(int(math.Ceil(y0-0.5)), 0)
		j1 := min(int(math.Floor(y1-0.5)), h-1)
		for b := j0 / bandRows; j0 <= j1 && b <= j1/bandRows; b++ {
			r.bands[b] = append(r.bands[b], int32(k))
		}
	}
	return r
}

// level returns the painted level at point (x, y): the last polygon that
// contains it, else the background.
func (r *renderer) level(x, y float64) float64 {
	cell := r.pgrid.at(x, y)
	p := vec{x, y}
	for k := len(cell) - 1; k >= 0; k-- {
		q := &r.polys[cell[k]]
		if q.box.contains(p) && pointInPolygon(p, q.pts) {
			return q.level
		}
	}
	return r.bg
}

// interval is the run of pixel columns [i0, i1] of one row within an edge's
// influence radius.
type interval struct {
	i0, i1 int
	e      int32
}

// worker holds one goroutine's scratch buffers.
type worker struct {
	iv, active []interval
	cand       []int32
	dist       []float64
	pieces     []int32
	nodes      nodeSet
	sq         []vec
	bufs       [][2][]vec
}

func newWorker() *worker {
	return &worker{sq: make([]vec, 0, 4)}
}

// clipBufs returns the two scratch buffers for recursion depth d.
func (ws *worker) clipBufs(d int) ([]vec, []vec) {
	for len(ws.bufs) <= d {
		ws.bufs = append(ws.bufs, [2][]vec{make([]vec, 0, 64), make([]vec, 0, 64)})
	}
	return ws.bufs[d][0], ws.bufs[d][1]
}

// renderPolygons renders the background and polygons into p, in parallel
// over row bands; each row is computed independently, so the output does not
// depend on scheduling.
func (r *renderer) renderPolygons(p *plane.Plane) {
	// Scratch space, one per goroutine at a time.
	pool := sync.Pool{New: func() any { return newWorker() }}
	parallel.For(len(r.bands), 0, func(b int) {
		ws := pool.Get().(*worker)
		for j := b * bandRows; j < min((b+1)*bandRows, r.h); j++ {
			r.row(ws, j, p.Pix[j*r.w:(j+1)*r.w])
		}
		pool.Put(ws)
	})
}

// row renders row j into out.
func (r *renderer) row(ws *worker, j int, out []float32) {
	yc := float64(j) + 0.5
	ws.iv = ws.iv[:0]
	for _, k := range r.bands[j/bandRows] {
		lo, hi, ok := capsuleSpan(&r.edges[k], yc, r.rinf)
		if !ok {
			continue
		}
		i0 := max(int(math.Ceil(lo-0.5)), 0)
		i1 := min(int(math.Floor(hi-0.5)), r.w-1)
		if i0 > i1 {
			continue
		}
		ws.iv = append(ws.iv, interval{i0, i1, k})
	}
	slices.SortFunc(ws.iv, func(a, b interval) int { return a.i0 - b.i0 })
	ws.active = ws.active[:0]
	k := 0
	for i := 0; i < r.w; {
		for k < len(ws.iv) && ws.iv[k].i0 <= i {
			ws.active = append(ws.active, ws.iv[k])
			k++
		}
		a := ws.active[:0]
		for _, v := range ws.active {
			if v.i1 >= i {
				a = append(a, v)
			}
		}
		ws.active = a
		if len(a) == 0 {
			next := r.w
			if k < len(ws.iv) {
				next = ws.iv[k].i0
			}
			v := float32(r.level(float64(i)+0.5, yc))
			for ; i < next; i++ {
				out[i] = v
			}
			continue
		}
		ws.cand = ws.cand[:0]
		for _, v := range a {
			ws.cand = append(ws.cand, v.e)
		}
		out[i] = float32(r.pixel(ws, float64(i)+0.5, yc))
		i++
	}
}

// capsuleSpan returns the interval of x on the line y = yc within distance
// rad of segment e (a capsule, convex, so the set is one interval).
func capsuleSpan(e *redge, yc, rad float64) (lo, hi float64, ok bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, p := range [2]vec{e.a, e.b} {
		dy := yc - p[1]
		if math.Abs(dy) <= rad {
			w := math.Sqrt(rad*rad - dy*dy)
			lo, hi = math.Min(lo, p[0]-w), math.Max(hi, p[0]+w)
		}
	}
	// Slab: 0 <= t(x) <= length and |u(x)| <= rad, t and u linear in x.
	sl, sh := math.Inf(-1), math.Inf(1)
	oy := yc - e.a[1]
	constrain := func(cx, c0, vmin, vmax float64) {
		if cx == 0 {
			if c0 < vmin || c0 > vmax {
				sl, sh = 1, 0
			}
			return
		}
		x0, x1 := (vmin-c0)/cx, (vmax-c0)/cx
		if x0 > x1 {
			x0, x1 = x1, x0
		}
		sl, sh = math.Max(sl, x0), math.Min(sh, x1)
	}
	constrain(e.dx, -e.a[0]*e.dx+oy*e.dy, 0, e.length)
	constrain(e.nx, -e.a[0]*e.nx+oy*e.ny, -rad, rad)
	if sl <= sh {
		lo, hi = math.Min(lo, sl), math.Max(hi, sh)
	}
	return lo, hi, lo <= hi
}
