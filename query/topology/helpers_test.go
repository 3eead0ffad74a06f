package topology

import (
	"math"
	"strings"
	"testing"

	"partsieve/catalog"
	"partsieve/query/spec"
)

// mk builds a catalog part from name/value pairs of numeric fields.
func mk(kind catalog.Kind, typ, mpn string, kv ...any) catalog.Part {
	p := catalog.Part{Kind: kind, Type: typ, Mfr: "Testworks", MPN: mpn, Num: map[string]float64{}}
	for i := 0; i+1 < len(kv); i += 2 {
		name := kv[i].(string)
		switch v := kv[i+1].(type) {
		case float64:
			p.Num[name] = v
		case int:
			p.Num[name] = float64(v)
		case string:
			switch name {
			case "fuse_std":
				p.FuseStd = v
			case "rerate":
				p.Rerate = v
			case "package":
				p.Package = v
			}
		}
	}
	return p
}

// withOffer adds one offer with price breaks qty→price.
func withOffer(p catalog.Part, supplier, cur string, stock int64, breaks ...float64) catalog.Part {
	o := catalog.Offer{Supplier: supplier, Currency: cur, Stock: &stock}
	for i := 0; i+1 < len(breaks); i += 2 {
		o.Breaks = append(o.Breaks, catalog.PriceBreak{Qty: int64(breaks[i]), Price: breaks[i+1]})
	}
	p.Offers = append(p.Offers, o)
	return p
}

// mustSpec parses TOML text, failing the test on error.
func mustSpec(t testing.TB, src string) *spec.Spec {
	t.Helper()
	s, err := spec.Parse("test.toml", []byte(src))
	if err != nil {
		t.Fatalf("spec:\n%v", err)
	}
	return s
}

// edit replaces old by new in a spec text (once, must exist).
func edit(t testing.TB, src, old, new string) string {
	t.Helper()
	if !strings.Contains(src, old) {
		t.Fatalf("edit: %q not in spec", old)
	}
	return strings.Replace(src, old, new, 1)
}

func near(got, want, tol float64) bool { return math.Abs(got-want) <= tol }

// findCheck returns the check named name of role in cs.
func findCheck(t testing.TB, cs []Check, role, name string) Check {
	t.Helper()
	for _, c := range cs {
		if c.Role == role && c.Name == name {
			return c
		}
	}
	var names []string
	for _, c := range cs {
		names = append(names, c.Role+": "+c.Name)
	}
	t.Fatalf("no check %s: %s in %v", role, name, names)
	return Check{}
}

func topo(t testing.TB, r *Result, tp Topology) *TopologyResult {
	t.Helper()
	for i := range r.Topologies {
		if r.Topologies[i].Topology == tp {
			return &r.Topologies[i]
		}
	}
	t.Fatalf("no result for %s", tp)
	return nil
}

func elim(tr *TopologyResult, role, check string) int {
	for _, e := range tr.Eliminated {
		if e.Role == role && e.Check == check {
			return e.Count
		}
	}
	return 0
}
