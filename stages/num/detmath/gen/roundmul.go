//go:build ignore

// roundmul rewrites Go files so that no floating-point product can be fused
// with an addition into one multiply-add: every float64 product x*y becomes
// float64(x*y) (and x/c, for c a power of two, which the compiler turns into
// a product, float64(x/c)), and z *= y becomes z = float64(z * (y)). The Go
// specification lets a compiler fuse x*y + z (and does, on arm64, ppc64le,
// s390x, riscv64 and amd64 with GOAMD64=v3), and "an explicit floating-point
// type conversion rounds to the precision of the target type, preventing
// fusion that would discard that rounding" (The Go Programming Language
// Specification, "Arithmetic operators", "Floating-point operators").
//
// Usage, from the package's directory:
//
//	go run gen/roundmul.go [-lines file:line,...] file.go ...
//
// With -lines, only products on the listed lines are rewritten (used for
// the numerics of the stages, where the compiler's own listing names the
// fused lines); without it, every product is (used for detmath's port of
// the standard library).
package main

import (
	"flag"
	"fmt"
	"go/ast"
	"go/constant"
	"go/importer"
	"go/parser"
	"go/token"
	"go/types"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
)

type edit struct {
	off  int
	text string
	// order among edits at one offset: openings of wider spans first,
	// closings of narrower spans first.
	key int
}

func main() {
	lines := flag.String("lines", "", "comma-separated file:line list; rewrite only these lines")
	defs := flag.Bool("defs", false, "with -lines, also rewrite the assignments of the float variables used on those lines (a product stored in a variable fuses with the addition that uses it)")
	flag.Parse()
	only := map[string]bool{}
	for _, l := range strings.Split(*lines, ",") {
		if l != "" {
			only[l] = true
		}
	}
	fset := token.NewFileSet()
	var files []*ast.File
	for _, name := range flag.Args() {
		f, err := parser.ParseFile(fset, name, nil, parser.ParseComments)
		if err != nil {
			fail(err)
		}
		files = append(files, f)
	}
	conf := types.Config{Importer: importer.ForCompiler(fset, "source", nil), Error: func(error) {}}
	info := &types.Info{Types: map[ast.Expr]types.TypeAndValue{}, Defs: map[*ast.Ident]types.Object{}, Uses: map[*ast.Ident]types.Object{}}
	conf.Check("p", fset, files, info)
	if *defs && len(only) > 0 {
		expandDefs(fset, files, info, only)
	}
	for i, f := range files {
		name := flag.Args()[i]
		src, err := os.ReadFile(name)
		if err != nil {
			fail(err)
		}
		var edits []edit
		want := func(p token.Pos) bool {
			if len(only) == 0 {
				return true
			}
			pos := fset.Position(p)
			return only[filepath.Base(pos.Filename)+":"+strconv.Itoa(pos.Line)]
		}
		isFloat := func(e ast.Expr) bool {
			tv, ok := info.Types[e]
			if !ok || tv.Value != nil {
				return false
			}
			b, ok := tv.Type.Underlying().(*types.Basic)
			return ok && b.Info()&types.IsFloat != 0
		}
		var parents []ast.Node
		ast.Inspect(f, func(n ast.Node) bool {
			if n == nil {
				parents = parents[:len(parents)-1]
				return true
			}
			defer func() { parents = append(parents, n) }()
			switch x := n.(type) {
			case *ast.BinaryExpr:
				if !(x.Op == token.MUL || x.Op == token.QUO && pow2(info, x.Y)) || !isFloat(x) || !want(x.OpPos) {
					return true
				}
				if len(parents) > 0 {
					if c, ok := parents[len(parents)-1].(*ast.CallExpr); ok && len(c.Args) == 1 {
						if id, ok := c.Fun.(*ast.Ident); ok && (id.Name == "float64" || id.Name == "float32") {
							return true
						}
					}
				}
				span := int(x.End() - x.Pos())
				edits = append(edits,
					edit{fset.Position(x.Pos()).Offset, "float64(", -span},
					edit{fset.Position(x.End()).Offset, ")", span})
			case *ast.AssignStmt:
				if x.Tok != token.MUL_ASSIGN || len(x.Lhs) != 1 || !isFloat(x.Lhs[0]) || !want(x.TokPos) {
					return true
				}
				lhs := string(src[fset.Position(x.Lhs[0].Pos()).Offset:fset.Position(x.Lhs[0].End()).Offset])
				tok := fset.Position(x.TokPos).Offset
				edits = append(edits,
					edit{tok, "= float64(" + lhs + " * (", 0},
					edit{tok + 2, "\x00", 0}, // drop "*="
					edit{fset.Position(x.Rhs[0].End()).Offset, "))", 1 << 30})
			}
			return true
		})
		if len(edits) == 0 {
			continue
		}
		sort.SliceStable(edits, func(a, b int) bool {
			if edits[a].off != edits[b].off {
				return edits[a].off < edits[b].off
			}
			return edits[a].key < edits[b].key
		})
		var out strings.Builder
		last := 0
		for _, e := range edits {
			if e.text == "\x00" {
				last = e.off // skip the two bytes of "*="
				continue
			}
			out.Write(src[last:e.off])
			out.WriteString(e.text)
			last = e.off
		}
		out.Write(src[last:])
		if err := os.WriteFile(name, []byte(out.String()), 0o644); err != nil {
			fail(err)
		}
		fmt.Fprintf(os.Stderr, "roundmul: %s: %d products rounded\n", name, len(edits)/2)
	}
}

// pow2 reports whether e is a constant power of two (or its negative): the
// compiler turns x/c into x*(1/c) when 1/c is exact, and that product fuses
// like any other.
func pow2(info *types.Info, e ast.Expr) bool {
	tv, ok := info.Types[e]
	if !ok || tv.Value == nil {
		return false
	}
	f, ok := constant.Float64Val(constant.ToFloat(tv.Value))
	if !ok || f == 0 {
		return false
	}
	frac, _ := math.Frexp(math.Abs(f))
	return frac == 0.5
}

// expandDefs adds to only the lines of every assignment to a float
// variable that is used on a line already in only.
func expandDefs(fset *token.FileSet, files []*ast.File, info *types.Info, only map[string]bool) {
	key := func(p token.Pos) string {
		pos := fset.Position(p)
		return filepath.Base(pos.Filename) + ":" + strconv.Itoa(pos.Line)
	}
	obj := func(id *ast.Ident) types.Object {
		if o := info.Defs[id]; o != nil {
			return o
		}
		return info.Uses[id]
	}
	assigned := map[types.Object][]string{}
	used := map[types.Object]bool{}
	for _, f := range files {
		ast.Inspect(f, func(n ast.Node) bool {
			switch x := n.(type) {
			case *ast.AssignStmt:
				for _, l := range x.Lhs {
					if id, ok := l.(*ast.Ident); ok {
						if o := obj(id); o != nil {
							for _, r := range x.Rhs {
								for ln := fset.Position(r.Pos()).Line; ln <= fset.Position(r.End()).Line; ln++ {
									assigned[o] = append(assigned[o], filepath.Base(fset.Position(r.Pos()).Filename)+":"+strconv.Itoa(ln))
								}
							}
						}
					}
				}
			case *ast.Ident:
				if only[key(x.Pos())] {
					if o := obj(x); o != nil {
						used[o] = true
					}
				}
			}
			return true
		})
	}
	for o := range used {
		v, ok := o.(*types.Var)
		if !ok {
			continue
		}
		if b, ok := v.Type().Underlying().(*types.Basic); !ok || b.Info()&types.IsFloat == 0 {
			continue
		}
		for _, l := range assigned[o] {
			only[l] = true
		}
	}
}

func fail(err error) {
	fmt.Fprintln(os.Stderr, "roundmul:", err)
	os.Exit(1)
}
