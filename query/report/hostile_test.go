package report

import (
	"context"
	"strings"
	"testing"

	"partsieve/catalog"
	"partsieve/query/spec"
	"partsieve/query/topology"
	"partsieve/seeddata"
)

// Hostile catalog text: markup and script in every text field a report
// shows, as a supplier sheet could carry them.
const (
	evilMPN      = `<script>alert(1)</script>`
	evilMfr      = `"><img src=x onerror=alert(2)>`
	evilDesc     = `</td></tr></table><script>alert(3)</script>`
	evilPackage  = `<svg onload=alert(4)>`
	evilSheet    = `javascript:alert(5)`
	evilSupplier = `<iframe src="https://evil.example/">`
	evilMPN2     = `"><img src=x onerror=alert(6)>`
	evilZener    = `]]><script>alert(7)</script><![CDATA[`
	evilSpecLine = `# </pre><script>alert(8)</script>`
)

// TestHostileCatalogText: parts whose maker, part number, description,
// package, supplier and datasheet hold HTML and script are picked and
// reported; the page must show them as text only, in the tables and in
// the SVG legends, and hold no element or attribute that runs or loads.
func TestHostileCatalogText(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	all, err := st.Find(ctx, catalog.Query{Offers: true})
	if err != nil {
		t.Fatal(err)
	}
	data, path, _ := seeddata.Spec("vehicle-12v-accessory")
	data = append(append([]byte(nil), data...), []byte("\n"+evilSpecLine+"\n")...)
	s, err := spec.Parse(path, data)
	if err != nil {
		t.Fatal(err)
	}
	opt := topology.Options{Top: 3}
	r := topology.Evaluate(s, topology.NewCatalog(all), opt)
	best := func(tp topology.Topology) topology.Candidate {
		for _, tr := range r.Topologies {
			if tr.Topology == tp && len(tr.Candidates) > 0 {
				return tr.Candidates[0]
			}
		}
		t.Fatalf("%s has no candidate", tp)
		return topology.Candidate{}
	}
	pf, nf := best(topology.PFETHigh), best(topology.NFETLow)
	if len(pf.Parts) < 2 {
		t.Fatal("the pfet-high design has no Zener")
	}
	rename := func(ref topology.PartRef, mpn string, all []catalog.Part) {
		for i := range all {
			p := &all[i]
			if p.MPN == ref.MPN && p.Mfr == ref.Mfr {
				p.MPN, p.Mfr, p.Desc, p.Package, p.Datasheet = mpn, evilMfr, evilDesc, evilPackage, evilSheet
				for k := range p.Offers {
					p.Offers[k].Supplier = evilSupplier
				}
				return
			}
		}
		t.Fatalf("part %s not found", ref.MPN)
	}
	rename(pf.Parts[0], evilMPN, all)
	rename(nf.Parts[0], evilMPN2, all)
	rename(pf.Parts[1], evilZener, all) // the Zener of both MOSFET stages
	r = topology.Evaluate(s, topology.NewCatalog(all), opt)
	if got := best(topology.PFETHigh).Parts[0].MPN; got != evilMPN {
		t.Fatalf("the renamed MOSFET is no longer the best pfet-high design (%s)", got)
	}
	b, err := Render(Input{Spec: s, SpecText: data, Result: r, Parts: all})
	if err != nil {
		t.Fatal(err)
	}
	pg := checkPage(t, b)
	for _, p := range pg.problems {
		t.Error(p)
	}
	raw := strings.ToLower(string(b))
	for _, bad := range []string{"<script", "<img", "<iframe", "<svg onload", "<![cdata["} {
		if strings.Contains(raw, bad) {
			t.Errorf("raw %q in the page", bad)
		}
	}
	// every "onerror=" is the escaped text of a hostile value
	for i, page := 0, string(b); ; {
		j := strings.Index(page[i:], "onerror=")
		if j < 0 {
			break
		}
		if !strings.HasSuffix(page[:i+j], "&lt;img src=x ") {
			t.Errorf("onerror= outside the escaped hostile text: %q", page[max(0, i+j-40):i+j+20])
		}
		i += j + 1
	}
	// shown, as text, where they belong
	for _, s := range []string{evilMPN, evilMfr, evilDesc, evilPackage, evilSheet, evilSupplier, evilMPN2, evilZener} {
		if !strings.Contains(pg.text, s) {
			t.Errorf("%q not shown as text", s)
		}
	}
	svgText := strings.Join(pg.svgText, "\n")
	for _, s := range []string{"#1 " + evilMPN + " + " + evilZener, "#1 " + evilMPN2 + " + " + evilZener} {
		if !strings.Contains(svgText, s) {
			t.Errorf("legend %q not in the SVG text", s)
		}
	}
	if len(pg.pre) != 1 || !strings.Contains(pg.pre[0], evilSpecLine) {
		t.Error("the spec's hostile comment is not shown verbatim in the <pre>")
	}
	if !strings.Contains(string(b), "&lt;script&gt;alert(1)&lt;/script&gt;") {
		t.Error("the part number is not in its escaped form")
	}
}

// TestCheckPageCatches: the page checker itself finds what it must.
func TestCheckPageCatches(t *testing.T) {
	page := `<!DOCTYPE html><html><head><style>p{background:url(http://x.example/a.png)}</style></head><body>
<script>alert(1)</script><img src=x onerror=alert(2)><a href="https://x.example/">x</a>
<svg viewBox="0 0 1 1"><text x="0" y="0" style="fill:url(#g)">t</text></svg><p onclick="x()">p</p></body></html>`
	pg := checkPage(t, []byte(page))
	want := []string{"element <script>", "element <img>", "attribute src on <img>", "event attribute onerror", "link https://x.example/",
		"url() in the style sheet", "url() in a style attribute", "event attribute onclick"}
	got := strings.Join(pg.problems, "\n")
	for _, w := range want {
		if !strings.Contains(got, w) {
			t.Errorf("checker missed %q; found:\n%s", w, got)
		}
	}
	if pg.svgs != 1 || len(pg.svgText) != 1 || pg.svgText[0] != "t" {
		t.Errorf("svgs %d, svg text %q", pg.svgs, pg.svgText)
	}
}
