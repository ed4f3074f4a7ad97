package note

import (
	"go/ast"
	"go/parser"
	"go/token"
	"regexp"
	"strconv"
	"testing"
)

// TestCodesListed reads codes.go: every code has a doc comment, is
// lower-case words joined by hyphens, and means one thing within its
// group (the pitch and tone sources share "user" on purpose: they are
// different keys).
func TestCodesListed(t *testing.T) {
	fs := token.NewFileSet()
	f, err := parser.ParseFile(fs, "codes.go", nil, parser.ParseComments)
	if err != nil {
		t.Fatal(err)
	}
	shape := regexp.MustCompile(`^[a-z0-9]+(-[a-z0-9]+)*$`)
	seen := map[string]string{}
	n := 0
	for _, d := range f.Decls {
		g, ok := d.(*ast.GenDecl)
		if !ok || g.Tok != token.CONST {
			continue
		}
		inGroup := map[string]bool{}
		for _, s := range g.Specs {
			v := s.(*ast.ValueSpec)
			name := v.Names[0].Name
			if v.Doc == nil || len(v.Doc.List) == 0 {
				t.Errorf("%s has no doc comment", name)
			}
			code, err := strconv.Unquote(v.Values[0].(*ast.BasicLit).Value)
			if err != nil || !shape.MatchString(code) {
				t.Errorf("%s = %q is not lower-case words joined by hyphens", name, code)
			}
			if inGroup[code] {
				t.Errorf("%s = %q twice in one group", name, code)
			}
			inGroup[code] = true
			if other, dup := seen[code]; dup && code != "user" {
				t.Errorf("%s and %s are both %q", other, name, code)
			}
			seen[code] = name
			n++
		}
	}
	if n < 30 {
		t.Errorf("read %d codes from codes.go, want the whole list", n)
	}
}

func TestSplitJoin(t *testing.T) {
	ns := []Note{New(NoEdges, "only sine patterns"), New(Curved, "bows")}
	texts, codes := Split(ns)
	back, ok := Join(texts, codes)
	if !ok || len(back) != 2 || back[0] != ns[0] || back[1] != ns[1] {
		t.Errorf("Join(Split(%v)) = %v, %v", ns, back, ok)
	}
	if _, ok := Join(texts, codes[:1]); ok {
		t.Error("Join accepted one code for two sentences")
	}
	if _, ok := Join([]string{"x"}, []string{""}); ok {
		t.Error("Join accepted an empty code")
	}
	if texts, codes := Split(nil); texts == nil || codes == nil {
		t.Error("Split(nil) gave nil slices; the JSON wants []")
	}
}
