package main

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
)

// The page's ES modules are joined into one inline script without a
// bundler, which is possible because they keep to a small subset of the
// module syntax, checked here (anything else is an error, not a guess):
//
//	import { a, b as c } from './file.js';        (one or more lines)
//	export function f / export async function f / export class C /
//	export const x / export let x                 (at the start of a line)
//
// Each module becomes a function scope that returns its exports, in an order
// where every module comes after the ones it imports:
//
//	const $file = (() => { const { a, b: c } = $other; ...; return { f, C, x }; })();
var (
	importRe = regexp.MustCompile(`(?m)^import\s*\{([^}]*)\}\s*from\s*'\./([A-Za-z0-9_-]+\.js)';[ \t]*\n?`)
	exportRe = regexp.MustCompile(`(?m)^export\s+((?:async\s+)?function\*?|class|const|let)\s+([A-Za-z_$][A-Za-z0-9_$]*)`)
	strayRe  = regexp.MustCompile(`(?m)^\s*(import|export)\b`)
	nameRe   = regexp.MustCompile(`^[A-Za-z_$][A-Za-z0-9_$]*$`)
)

// module is one parsed source file.
type module struct {
	file    string
	imports []importDecl
	exports []string
	body    string
}

type importDecl struct {
	from  string
	names [][2]string // {exported, local}
}

// parseModule reads the import and export declarations of one module.
func parseModule(file, src string) (*module, error) {
	m := &module{file: file}
	var perr error
	body := importRe.ReplaceAllStringFunc(src, func(decl string) string {
		sub := importRe.FindStringSubmatch(decl)
		d := importDecl{from: sub[2]}
		for _, part := range strings.Split(sub[1], ",") {
			part = strings.TrimSpace(part)
			if part == "" {
				continue
			}
			f := strings.Fields(part)
			switch {
			case len(f) == 1 && nameRe.MatchString(f[0]):
				d.names = append(d.names, [2]string{f[0], f[0]})
			case len(f) == 3 && f[1] == "as" && nameRe.MatchString(f[0]) && nameRe.MatchString(f[2]):
				d.names = append(d.names, [2]string{f[0], f[2]})
			default:
				perr = fmt.Errorf("%s: cannot read import of %q", file, part)
			}
		}
		m.imports = append(m.imports, d)
		return ""
	})
	if perr != nil {
		return nil, perr
	}
	body = exportRe.ReplaceAllStringFunc(body, func(decl string) string {
		sub := exportRe.FindStringSubmatch(decl)
		m.exports = append(m.exports, sub[2])
		return strings.TrimPrefix(decl, "export ")
	})
	if loc := strayRe.FindStringIndex(body); loc != nil {
		line := 1 + strings.Count(body[:loc[0]], "\n")
		return nil, fmt.Errorf("%s: unsupported import or export near line %d (see site/pack/modules.go)", file, line)
	}
	m.body = body
	return m, nil
}

// joinModules reads the module entry in dir and every module it imports,
// and returns them joined into one script.
func joinModules(dir, entry string) (string, error) {
	mods := map[string]*module{}
	var order []*module
	state := map[string]int{} // 1 = visiting, 2 = done
	var visit func(file string) error
	visit = func(file string) error {
		switch state[file] {
		case 1:
			return fmt.Errorf("%s: import cycle", file)
		case 2:
			return nil
		}
		state[file] = 1
		src, err := os.ReadFile(filepath.Join(dir, file))
		if err != nil {
			return err
		}
		m, err := parseModule(file, string(src))
		if err != nil {
			return err
		}
		mods[file] = m
		for _, d := range m.imports {
			if err := visit(d.from); err != nil {
				return err
			}
		}
		state[file] = 2
		order = append(order, m)
		return nil
	}
	if err := visit(entry); err != nil {
		return "", err
	}
	var b strings.Builder
	for _, m := range order {
		fmt.Fprintf(&b, "// %s\nconst %s = (() => {\n", m.file, scopeName(m.file))
		for _, d := range m.imports {
			from := mods[d.from]
			var parts []string
			for _, n := range d.names {
				if !contains(from.exports, n[0]) {
					return "", fmt.Errorf("%s imports %s, which %s does not export", m.file, n[0], d.from)
				}
				if n[0] == n[1] {
					parts = append(parts, n[0])
				} else {
					parts = append(parts, n[0]+": "+n[1])
				}
			}
			fmt.Fprintf(&b, "const { %s } = %s;\n", strings.Join(parts, ", "), scopeName(d.from))
		}
		b.WriteString(m.body)
		fmt.Fprintf(&b, "\nreturn { %s };\n})();\n", strings.Join(m.exports, ", "))
	}
	return b.String(), nil
}

// scopeName is the variable holding a module's exports: "$" and the file
// name without ".js", other characters replaced by "_".
func scopeName(file string) string {
	base := strings.TrimSuffix(file, ".js")
	return "$" + strings.Map(func(r rune) rune {
		if r == '-' {
			return '_'
		}
		return r
	}, base)
}

func contains(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}
