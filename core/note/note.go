// Package note pairs every sentence the core says to people (a warning, a
// reason a candidate was set aside or a target is missing, a cause to
// measure a photo again) with a stable code for programs. The page and
// scripts branch on the code; the sentence may be reworded at any time.
// Every code is listed, with its meaning, in codes.go; the quality flags
// of single measurements are codes of the same kind, listed beside their
// measurements (edge.Flag in core/edge/quality.go, sine.Flag in
// core/sine/star.go).
package note

// Code is a stable, machine-readable name for one kind of note: lower-case
// words joined by hyphens. Codes are never renamed or reused for another
// meaning; new ones may be added.
type Code string

// Note is one sentence for people with its code.
type Note struct {
	Code Code
	Text string
}

// New returns a note.
func New(c Code, text string) Note { return Note{c, text} }

// Split returns the sentences and the codes of notes, aligned (the i-th
// code belongs to the i-th sentence); both are non-nil.
func Split(ns []Note) (texts, codes []string) {
	texts, codes = make([]string, len(ns)), make([]string, len(ns))
	for i, n := range ns {
		texts[i], codes[i] = n.Text, string(n.Code)
	}
	return texts, codes
}

// Join is the inverse of Split: it pairs aligned sentences and codes, and
// reports false when their lengths differ or a code is empty.
func Join(texts, codes []string) ([]Note, bool) {
	if len(texts) != len(codes) {
		return nil, false
	}
	ns := make([]Note, len(texts))
	for i := range texts {
		if codes[i] == "" {
			return nil, false
		}
		ns[i] = Note{Code(codes[i]), texts[i]}
	}
	return ns, true
}
