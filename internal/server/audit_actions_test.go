package server

import (
	"go/ast"
	"go/parser"
	"go/token"
	"strconv"
	"strings"
	"testing"
)

// Every audit action the domain declares has a plain name on the audit
// page (and so a place in its action filter): the constants are read
// from the domain's source, so a new action without a name fails here.
func TestEveryAuditActionIsNamed(t *testing.T) {
	f, err := parser.ParseFile(token.NewFileSet(), "../wardload/audit.go", nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	named := map[string]bool{}
	for _, a := range auditActions {
		named[a.code] = true
	}
	n := 0
	ast.Inspect(f, func(node ast.Node) bool {
		vs, ok := node.(*ast.ValueSpec)
		if !ok {
			return true
		}
		for i, id := range vs.Names {
			if !strings.HasPrefix(id.Name, "Action") || i >= len(vs.Values) {
				continue
			}
			lit, ok := vs.Values[i].(*ast.BasicLit)
			if !ok {
				continue
			}
			code, _ := strconv.Unquote(lit.Value)
			n++
			if !named[code] {
				t.Errorf("wardload.%s (%q) has no plain name in auditActions", id.Name, code)
			}
		}
		return true
	})
	if n < 20 {
		t.Fatalf("read %d actions from wardload/audit.go; the file moved?", n)
	}
}
