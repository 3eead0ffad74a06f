package main

import (
	"context"
	"path/filepath"
	"testing"

	"partsieve/catalog"
	"partsieve/query/where"
)

// BenchmarkFindSeed measures find on the seed catalog through the store,
// as the find command runs it (offers loaded): a parametric query, a text
// term, a part-number prefix and a fuzzy term.
func BenchmarkFindSeed(b *testing.B) {
	ctx := context.Background()
	a := &app{db: filepath.Join(b.TempDir(), "c.db")}
	st, err := a.open(ctx)
	if err != nil {
		b.Fatal(err)
	}
	defer st.Close()
	conds, err := where.ParseAll([]string{"type=p and vds>=30V and rdson<=25m"})
	if err != nil {
		b.Fatal(err)
	}
	cases := []struct {
		name string
		q    catalog.Query
	}{
		{"parametric", catalog.Query{Kind: catalog.MOSFET, Conds: conds, Sort: "rdson", Limit: 50, Offers: true}},
		{"text-term", catalog.Query{Text: "schottky", Limit: 50, Offers: true}},
		{"mpn-prefix", catalog.Query{Text: "qps30", Limit: 50, Offers: true}},
		{"fuzzy", catalog.Query{Text: "shottky", Limit: 50, Offers: true}},
	}
	for _, c := range cases {
		if _, err := st.Find(ctx, c.q); err != nil { // warm the index
			b.Fatal(err)
		}
		b.Run(c.name, func(b *testing.B) {
			for b.Loop() {
				if _, err := st.Find(ctx, c.q); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
