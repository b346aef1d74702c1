package main

import (
	"go/ast"
	"go/parser"
	"go/token"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// Every command that opens a database for writing gives the store its
// log (openStore): a command that called store.Open itself and stamped a
// fact would warn of a clock running behind through Go's default log,
// in another form and past the command's stderr. This reads the
// package's source and refuses any use of store.Open outside openStore,
// and a nil log given to openStore or to a function that takes one on
// the way to it (openExisting, openForReading, importInto, checkCopy).
// The warning's form on a command's stderr is checked by
// TestImportAnswersWarnsOfStampsAheadOfTheClock and
// TestServeWarnsOfStampsAheadOfTheClock.
func TestEveryCommandOpensItsStoreWithItsLog(t *testing.T) {
	files, err := filepath.Glob("*.go")
	check(t, err)
	fset := token.NewFileSet()
	type source struct {
		file      *ast.File
		storeName string
	}
	var sources []source
	for _, name := range files {
		if strings.HasSuffix(name, "_test.go") {
			continue
		}
		f, err := parser.ParseFile(fset, name, nil, 0)
		check(t, err)
		src := source{file: f}
		for _, imp := range f.Imports {
			if path, _ := strconv.Unquote(imp.Path.Value); path == "github.com/parley-elicit/parley/store" {
				src.storeName = "store"
				if imp.Name != nil {
					src.storeName = imp.Name.Name
				}
			}
		}
		sources = append(sources, src)
	}
	// The functions that take a log on the way to openStore, and at
	// which argument.
	logArg := map[string]int{}
	for _, src := range sources {
		for _, decl := range src.file.Decls {
			fn, ok := decl.(*ast.FuncDecl)
			if !ok || fn.Recv != nil {
				continue
			}
			i := 0
			for _, field := range fn.Type.Params.List {
				if star, ok := field.Type.(*ast.StarExpr); ok {
					if sel, ok := star.X.(*ast.SelectorExpr); ok && sel.Sel.Name == "Logger" {
						logArg[fn.Name.Name] = i
					}
				}
				i += max(len(field.Names), 1)
			}
		}
	}
	if _, ok := logArg["openStore"]; !ok {
		t.Fatal("no openStore taking a *slog.Logger in the package's source")
	}
	for _, src := range sources {
		for _, decl := range src.file.Decls {
			fn, ok := decl.(*ast.FuncDecl)
			if !ok {
				continue
			}
			ast.Inspect(fn, func(n ast.Node) bool {
				switch n := n.(type) {
				case *ast.SelectorExpr:
					if x, ok := n.X.(*ast.Ident); ok && src.storeName != "" && x.Name == src.storeName && n.Sel.Name == "Open" && fn.Name.Name != "openStore" {
						t.Errorf("%s: %s calls store.Open; open the database with openStore and the command's log", fset.Position(n.Pos()), fn.Name.Name)
					}
				case *ast.CallExpr:
					id, ok := n.Fun.(*ast.Ident)
					if !ok {
						return true
					}
					if i, takes := logArg[id.Name]; takes && i < len(n.Args) {
						if arg, ok := n.Args[i].(*ast.Ident); ok && arg.Name == "nil" {
							t.Errorf("%s: %s gives %s no log", fset.Position(n.Pos()), fn.Name.Name, id.Name)
						}
					}
				}
				return true
			})
		}
	}
}
