package coarse

import "sagitta/core/plane"

// Views are the reductions of one plane made so far, so that the searches
// run over the same plane (chart marks, edges, sine patterns) reduce it
// once for each factor rather than once each. The plane must not change
// while its Views are in use (make new Views after changing it). Not safe
// for concurrent use.
type Views struct {
	p   *plane.Plane
	byK map[int]*plane.Plane
}

// NewViews returns the (empty) set of reductions of p.
func NewViews(p *plane.Plane) *Views {
	return &Views{p: p, byK: map[int]*plane.Plane{}}
}

// Plane returns the full-resolution plane.
func (v *Views) Plane() *plane.Plane { return v.p }

// Shrink returns Shrink(v.Plane(), k), made on its first request.
func (v *Views) Shrink(k int) *plane.Plane {
	if k <= 1 {
		return v.p
	}
	if c, ok := v.byK[k]; ok {
		return c
	}
	c := Shrink(v.p, k)
	v.byK[k] = c
	return c
}

// Of returns vs, or new Views of p when vs is nil or belongs to another
// plane.
func Of(vs *Views, p *plane.Plane) *Views {
	if vs == nil || vs.p != p {
		return NewViews(p)
	}
	return vs
}
