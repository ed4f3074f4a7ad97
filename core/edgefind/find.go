// Package edgefind locates the measurable straight edges in a photo: the sides
// of dark or light polygons at any rotation on any fairly uniform
// background, whether printed by Sagitta or taped to a wall.
//
// It works coarse to fine: the photo is reduced (box average) to about 1500
// px across, a local threshold separates dark from light despite vignetting,
// marching squares traces the boundaries, Douglas-Peucker splits them into
// straight runs, and each run long enough becomes an oriented region at full
// resolution, placed clear of corners and of every other boundary. What
// cannot be measured well is listed with the reason.
package edgefind

import (
	"fmt"
	"math"

	"sagitta/core/edge"
	"sagitta/core/internal/coarse"
	"sagitta/core/note"
	"sagitta/core/plane"
)

// Options tunes the search. The zero value uses the defaults.
type Options struct {
	MinLengthPx    float64 // shortest usable edge, px (default 28; edge measurements flag lengths under 40)
	MaxHalfLenPx   float64 // longer edges are split into several regions of at most twice this, px (default 128)
	MaxHalfWidthPx float64 // widest region across an edge, px each side (default 32)
	MinHalfWidthPx float64 // narrowest acceptable region, px each side (default 10)
	CoarsePx       int     // target size of the reduced image's longer side, px (default 1500)
	// Views, when not nil, are reductions of the photo shared with the
	// other searches (the same reduction is made once).
	Views *coarse.Views
}

func (o Options) withDefaults() Options {
	if o.MinLengthPx <= 0 {
		o.MinLengthPx = 28
	}
	if o.MaxHalfLenPx <= 0 {
		o.MaxHalfLenPx = 128
	}
	if o.MaxHalfWidthPx <= 0 {
		o.MaxHalfWidthPx = 32
	}
	if o.MinHalfWidthPx <= 0 {
		o.MinHalfWidthPx = 10
	}
	if o.CoarsePx <= 0 {
		o.CoarsePx = 1500
	}
	return o
}

// Candidate is an edge region ready to be measured.
type Candidate struct {
	Region edge.Region
	// Boundary and Run identify the traced boundary and its straight run
	// the region came from (several regions may share a run when a long
	// edge is split).
	Boundary, Run int
}

// Reject is a straight run that will not be measured, with the reason in
// plain words and its code (core/note).
type Reject struct {
	X0, Y0, X1, Y1 float64 // ends of the run, px
	Reason         string
	Code           note.Code
}

// Reasons given for rejected runs.
const (
	ReasonShort   = "too short"
	ReasonRagged  = "not straight"
	ReasonCrowded = "too close to other detail"
	ReasonBorder  = "too close to the image border"
)

// reasonCode is the code of each reason.
var reasonCode = map[string]note.Code{
	ReasonShort:   note.TooShort,
	ReasonRagged:  note.NotStraight,
	ReasonCrowded: note.Crowded,
	ReasonBorder:  note.NearBorder,
}

// Edges finds the edge regions of a photo.
func Edges(p *plane.Plane, opt Options) ([]Candidate, []Reject) {
	opt = opt.withDefaults()
	k := max(1, int(math.Ceil(float64(max(p.W, p.H))/float64(opt.CoarsePx))))
	c := coarse.Of(opt.Views, p).Shrink(k)
	if c.W < 8 || c.H < 8 {
		return nil, nil
	}
	t := coarse.Level(c, tilePx, minTileRatio)
	cts := contours(c, t, 2)
	fk := float64(k)

	// Split every boundary into straight runs and label the coarse pixels
	// each run passes through, so regions can be kept clear of the others.
	type run struct {
		boundary, id int
		pts          [][2]float64 // coarse
	}
	var runs []run
	label := make([]int32, c.W*c.H)
	for i := range label {
		label[i] = -1
	}
	for bi, ct := range cts {
		idx := simplify(ct, 1.0)
		pts := ct.pts
		if ct.closed {
			pts = append(pts[:len(pts):len(pts)], pts[0])
		}
		for j := 1; j < len(idx); j++ {
			seg := pts[idx[j-1] : idx[j]+1]
			id := len(runs)
			runs = append(runs, run{bi, id, seg})
			for _, q := range seg {
				x, y := int(q[0]), int(q[1])
				if x >= 0 && y >= 0 && x < c.W && y < c.H {
					label[y*c.W+x] = int32(id)
				}
			}
		}
	}

	var cands []Candidate
	var rejects []Reject
	for _, r := range runs {
		a, b := r.pts[0], r.pts[len(r.pts)-1]
		lenPx := dist(a, b) * fk
		rej := func(reason string) {
			rejects = append(rejects, Reject{a[0] * fk, a[1] * fk, b[0] * fk, b[1] * fk, reason, reasonCode[reason]})
		}
		if lenPx < opt.MinLengthPx {
			if lenPx >= opt.MinLengthPx/2 {
				rej(ReasonShort)
			}
			continue
		}
		cx, cy, dx, dy, lo, hi, rms := fitLine(r.pts)
		if rms > 0.75 {
			rej(ReasonRagged)
			continue
		}
		// Full-resolution geometry of the run.
		mid := 0.5 * (lo + hi)
		cx, cy = (cx+mid*dx)*fk, (cy+mid*dy)*fk
		half := 0.5 * (hi - lo) * fk
		// Split long runs into pieces.
		pieces := max(1, int(math.Ceil(half/opt.MaxHalfLenPx)))
		pieceHalf := half / float64(pieces)
		for q := 0; q < pieces; q++ {
			off := -half + (2*float64(q)+1)*pieceHalf
			pcx, pcy := cx+off*dx, cy+off*dy
			reg, reason := place(pcx, pcy, dx, dy, pieceHalf, r.id, label, c.W, c.H, fk, p.W, p.H, opt)
			if reason != "" {
				e := pieceHalf
				rejects = append(rejects, Reject{pcx - e*dx, pcy - e*dy, pcx + e*dx, pcy + e*dy, reason, reasonCode[reason]})
				continue
			}
			cands = append(cands, Candidate{Region: reg, Boundary: r.boundary, Run: r.id})
		}
	}
	return cands, rejects
}

// place sizes the region for a straight run centred at (cx, cy) px with
// unit direction (dx, dy) and half length half px: it shortens and narrows
// the region until no other labelled boundary and no image border lies
// within a safety margin of it, and returns the reason when no acceptable
// size remains.
func place(cx, cy, dx, dy, half float64, own int, label []int32, cw, ch int, fk float64, w, h int, opt Options) (edge.Region, string) {
	nx, ny := -dy, dx
	// Safety margin for blur beyond the traced boundary and for the coarse
	// grid's uncertainty.
	margin := 6 + fk
	// Gather the other runs' pixels near the region, in the run's frame.
	type pt struct{ u, w float64 }
	var others []pt
	reachU := half + margin + fk
	reachW := opt.MaxHalfWidthPx + margin + fk
	ext := math.Abs(reachU*dx) + math.Abs(reachW*nx)
	eyt := math.Abs(reachU*dy) + math.Abs(reachW*ny)
	x0, x1 := int((cx-ext)/fk)-1, int((cx+ext)/fk)+1
	y0, y1 := int((cy-eyt)/fk)-1, int((cy+eyt)/fk)+1
	for y := max(y0, 0); y <= min(y1, ch-1); y++ {
		for x := max(x0, 0); x <= min(x1, cw-1); x++ {
			l := label[y*cw+x]
			if l < 0 || int(l) == own {
				continue
			}
			px, py := (float64(x)+0.5)*fk-cx, (float64(y)+0.5)*fk-cy
			u, v := px*dx+py*dy, px*nx+py*ny
			if math.Abs(u) <= reachU && math.Abs(v) <= reachW {
				others = append(others, pt{u, v})
			}
		}
	}
	// Try widths from the widest down; for each, the longest clear length.
	bestScore, best := 0.0, edge.Region{}
	border := false
	for hw := opt.MaxHalfWidthPx; hw >= opt.MinHalfWidthPx-1e-9; hw -= 4 {
		hl := half - margin
		for _, o := range others {
			if math.Abs(o.w) <= hw+margin {
				hl = math.Min(hl, math.Abs(o.u)-margin-fk)
			}
		}
		// Stay inside the image.
		hlb := insideHalfLen(cx, cy, dx, dy, nx, ny, hl, hw, w, h)
		if hlb < hl {
			border = true
			hl = hlb
		}
		if 2*hl < opt.MinLengthPx {
			continue
		}
		// Prefer long regions, then wide ones: the length sets the number of
		// phases, the width how much of the profile's tails is seen.
		score := hl * math.Min(hw, 24)
		if score > bestScore {
			bestScore = score
			best = edge.Region{X: cx, Y: cy, AngleDeg: math.Atan2(dy, dx) * 180 / math.Pi, HalfLen: hl, HalfWidth: hw}
		}
	}
	if bestScore == 0 {
		if border {
			return best, ReasonBorder
		}
		return best, ReasonCrowded
	}
	return best, ""
}

// insideHalfLen returns the largest half length up to hl for which the
// region's rectangle lies inside the w x h image.
func insideHalfLen(cx, cy, dx, dy, nx, ny, hl, hw float64, w, h int) float64 {
	for hl > 0 {
		ok := true
		for _, s := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
			x := cx + s[0]*hl*dx + s[1]*hw*nx
			y := cy + s[0]*hl*dy + s[1]*hw*ny
			if x < 0 || y < 0 || x > float64(w) || y > float64(h) {
				ok = false
				break
			}
		}
		if ok {
			return hl
		}
		hl -= 2
	}
	return 0
}

// String describes a reject for logs and tests.
func (r Reject) String() string {
	return fmt.Sprintf("(%.0f,%.0f)-(%.0f,%.0f): %s", r.X0, r.Y0, r.X1, r.Y1, r.Reason)
}
