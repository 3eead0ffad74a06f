package report

import (
	"bytes"
	"encoding/base64"
	"errors"
	"fmt"
	"html/template"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"

	"partsieve/catalog"
	"partsieve/catalog/units"
	"partsieve/query/spec"
	"partsieve/query/topology"
)

// Input is what a report shows.
type Input struct {
	// Spec is the parsed spec and SpecText the file as written (shown
	// verbatim).
	Spec     *spec.Spec
	SpecText []byte
	// Result is the pick to report.
	Result *topology.Result
	// Parts are the catalog parts of the result's designs
	// (topology.CandidateParts): their descriptions and datasheet
	// references are listed, and the loss and temperature curves are
	// computed from them. Without them those curves are left out.
	Parts []catalog.Part
	// Generated is the time shown in the header; zero leaves it out.
	Generated time.Time
}

// Write renders the report of in as one HTML document to w.
func Write(w io.Writer, in Input) error {
	b, err := Render(in)
	if err != nil {
		return err
	}
	_, err = w.Write(b)
	return err
}

// Render returns the report of in as one self-contained HTML document:
// inline CSS, the plots as inline SVG, the plot font embedded once as a
// data URL; nothing is loaded from elsewhere, and a content security
// policy forbids scripts and remote loads.
func Render(in Input) ([]byte, error) {
	if in.Spec == nil || in.Result == nil {
		return nil, errors.New("report: spec and result are required")
	}
	pg, err := build(in)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if err := pageTmpl.Execute(&buf, pg); err != nil {
		return nil, fmt.Errorf("report: %w", err)
	}
	return buf.Bytes(), nil
}

// page is the view the template renders: every value is a string ready
// to show (html/template escapes it), except the plots (cleaned SVG) and
// the font CSS.
type page struct {
	Title      string
	SpecFile   string
	Generated  string
	Rank       string
	Top        int
	Quantity   int64
	Currency   string
	HotCorner  string
	ColdCorner string
	SpecRows   []kv
	SpecText   string
	SpecNotes  []string
	PolicyName string
	PolicyDesc string
	Factors    []factorView
	Overrides  []string
	Unverified int
	Comparison []compareView
	Topologies []topoView
	Notes      []string
	Cautions   []string
	FontCSS    template.CSS
	MaxSeries  int
}

// kv is one line of the spec summary.
type kv struct {
	Group, Key, Value, Note string
}

type factorView struct {
	Name, Label, Value, Tag, Confidence, Source string
	Unverified                                  bool
}

type compareView struct {
	Topology, Status, Parts, Loss, Drop, Cost, Margin string
	Hazards                                           []string
}

type partView struct {
	Role, Mfr, MPN, Type, Desc, Package, Datasheet, Supplier, Price, PriceNote, Stock string
}

type candView struct {
	Rank                        int
	Parts                       []partView
	GateResistor                string
	Loss, Tj, Drop, Cost, Stock string
	Margin, MarginCheck         string
	MarginFails, MarginThin     bool
	Fault                       string
	Hazards                     []string
	Unsafe                      bool
	Checks                      []checkView
}

type checkView struct {
	Name, Role, Corner, Value, Limit, Margin, Formula, Source, Note string
	Pass                                                            bool
}

type topoView struct {
	ID, Name, Title, Status string
	Unsafe                  bool
	UnsafeReason            string
	Hazards                 []string
	Qualified               int
	Evaluated               string
	RankedOut               bool // the designs shown are ranked out (unsafe)
	Candidates              []candView
	NoneReason              string
	Eliminated              []string
	Notes                   []string
	Figures                 []figure
	PlotNotes               []string
	Best                    *candView
}

// fontCSS returns the @font-face rule that embeds the plot font
// (Liberation Sans, SIL Open Font License) as a data URL, once per page.
var fontCSS = sync.OnceValues(func() (template.CSS, error) {
	face := font.DefaultCache.Lookup(plotFont, vg.Points(10))
	if face.Face == nil {
		return "", errors.New("report: plot font not available")
	}
	var raw bytes.Buffer
	if _, err := face.Face.WriteSourceTo(nil, &raw); err != nil {
		return "", fmt.Errorf("report: plot font: %w", err)
	}
	css := `@font-face{font-family:"Liberation Sans";font-style:normal;font-weight:normal;src:url(data:font/ttf;base64,` +
		base64.StdEncoding.EncodeToString(raw.Bytes()) + `) format("truetype");}`
	return template.CSS(css), nil
})

func build(in Input) (*page, error) {
	s, r := in.Spec, in.Result
	css, err := fontCSS()
	if err != nil {
		return nil, err
	}
	pg := &page{
		Title:     "Protection picks for " + r.Spec,
		SpecFile:  r.Spec,
		Rank:      string(r.Rank),
		Top:       r.Top,
		Quantity:  r.Quantity,
		Currency:  r.Currency,
		SpecText:  string(in.SpecText),
		SpecNotes: s.Notes,
		Notes:     r.Notes,
		Cautions:  r.Cautions,
		FontCSS:   css,
		MaxSeries: MaxSeries,
	}
	if !in.Generated.IsZero() {
		pg.Generated = in.Generated.Format("2006-01-02 15:04 MST")
	}
	ns := topology.Needs(s)
	pg.HotCorner, pg.ColdCorner = ns.HotCorner, ns.ColdCorner
	pg.SpecRows = specRows(s)
	pr := s.Policy.Profile
	pg.PolicyName = pr.Name
	pg.PolicyDesc = pr.Title
	if pr.Base != "" {
		pg.PolicyDesc += " (based on " + pr.Base + ")"
	}
	for _, f := range pr.Factors() {
		fv := factorView{Name: f.Name, Label: f.Label, Value: strconv.FormatFloat(f.Value, 'g', -1, 64),
			Tag: "[" + string(f.Tag) + "]", Confidence: f.Confidence(), Source: f.Source, Unverified: f.Unverified()}
		if f.Unit != "" {
			fv.Value += " " + f.Unit
		}
		if fv.Unverified {
			pg.Unverified++
		}
		pg.Factors = append(pg.Factors, fv)
	}
	ovs := make([]string, 0, len(s.Policy.Overrides))
	for k, v := range s.Policy.Overrides {
		ovs = append(ovs, k+" = "+strconv.FormatFloat(v, 'g', -1, 64))
	}
	sort.Strings(ovs)
	pg.Overrides = ovs

	for _, c := range r.Comparison {
		cv := compareView{Topology: string(c.Topology), Status: c.Status, Parts: c.Parts, Hazards: c.Hazards,
			Loss: "–", Drop: "–", Cost: "–", Margin: "–"}
		if c.Status != "none" {
			cv.Loss, cv.Drop, cv.Cost = num(c.Loss, "W"), num(c.Drop, "V"), cost(c.Cost, c.Currency)
			cv.Margin = marginText(c.MinMargin)
		}
		pg.Comparison = append(pg.Comparison, cv)
	}

	parts := map[partKey]*catalog.Part{}
	for i := range in.Parts {
		p := &in.Parts[i]
		parts[partKey{p.Kind, catalog.NormKey(p.Mfr), catalog.NormKey(p.MPN)}] = p
	}
	var cat *topology.Catalog
	if len(in.Parts) > 0 {
		cat = topology.NewCatalog(in.Parts)
	}
	for _, tr := range r.Topologies {
		tv, err := topoSection(s, &tr, parts, cat)
		if err != nil {
			return nil, err
		}
		pg.Topologies = append(pg.Topologies, tv)
	}
	return pg, nil
}

type partKey struct {
	kind     catalog.Kind
	mfr, mpn string
}

func roleKind(role string) catalog.Kind {
	switch role {
	case "fuse":
		return catalog.Fuse
	case "mosfet":
		return catalog.MOSFET
	}
	return catalog.Diode
}

// topoSection builds the section of one topology: the candidates table,
// the plots and the checks of the best design.
func topoSection(s *spec.Spec, tr *topology.TopologyResult, parts map[partKey]*catalog.Part, cat *topology.Catalog) (topoView, error) {
	tv := topoView{ID: "t-" + string(tr.Topology), Name: string(tr.Topology), Title: tr.Title, Unsafe: tr.Unsafe,
		UnsafeReason: tr.UnsafeReason, Hazards: tr.Hazards, Qualified: tr.Qualified, NoneReason: tr.NoneReason, Notes: tr.Notes}
	var ev []string
	for role, n := range tr.Evaluated {
		ev = append(ev, fmt.Sprintf("%d %s", n, role))
	}
	sort.Strings(ev)
	tv.Evaluated = strings.Join(ev, ", ")
	for _, e := range tr.Eliminated {
		tv.Eliminated = append(tv.Eliminated, fmt.Sprintf("%s (%s): %d", e.Check, e.Role, e.Count))
	}
	list := tr.Candidates
	if len(list) == 0 && len(tr.RankedOut) > 0 {
		list, tv.RankedOut = tr.RankedOut, true
	}
	switch {
	case len(tr.Candidates) > 0:
		tv.Status = "ok"
	case tv.RankedOut:
		tv.Status = "unsafe"
	default:
		tv.Status = "none"
	}
	for k := range list {
		tv.Candidates = append(tv.Candidates, candidateView(&list[k], parts))
	}
	if len(list) == 0 {
		return tv, nil
	}
	tv.Best = &tv.Candidates[0]
	var ds []design
	for k := range list {
		if k == MaxSeries {
			break
		}
		ds = append(ds, design{name: designName(&list[k]), c: &list[k]})
	}
	if cat != nil {
		f, notes, err := lossFigure(s, cat, tr.Topology, ds)
		if err != nil {
			return tv, err
		}
		tv.PlotNotes = append(tv.PlotNotes, notes...)
		if f.SVG != "" {
			tv.Figures = append(tv.Figures, f)
		}
		f, notes, err = tjFigure(s, cat, tr.Topology, ds)
		if err != nil {
			return tv, err
		}
		tv.PlotNotes = append(tv.PlotNotes, notes...)
		if f.SVG != "" {
			tv.Figures = append(tv.Figures, f)
		}
	} else {
		tv.PlotNotes = append(tv.PlotNotes, "loss and temperature curves left out: the designs' catalog parts were not given")
	}
	f, err := marginFigure(tr.Topology, ds[0])
	if err != nil {
		return tv, err
	}
	if f.SVG != "" {
		tv.Figures = append(tv.Figures, f)
	}
	if len(list) > MaxSeries {
		tv.PlotNotes = append(tv.PlotNotes, fmt.Sprintf("the curves show the first %d designs; the table lists all %d", MaxSeries, len(list)))
	}
	return tv, nil
}

func candidateView(c *topology.Candidate, parts map[partKey]*catalog.Part) candView {
	cv := candView{Rank: c.Rank, Loss: num(c.Loss, "W"), Drop: num(c.Drop, "V") + " " + c.DropCorner,
		Cost: cost(c.Cost, c.Currency), Stock: "unknown", Hazards: c.Hazards, Unsafe: c.Unsafe,
		Margin: marginText(c.MinMargin), MarginCheck: c.MinMarginCheck}
	cv.Tj = num(c.TjHot, "°C")
	if math.IsInf(float64(c.TjHot), 1) {
		cv.Tj = "no stable point"
	}
	m := float64(c.MinMargin)
	cv.MarginFails = !(m >= 0)
	cv.MarginThin = m >= 0 && m < marginThin
	if c.Stock != nil {
		cv.Stock = strconv.FormatInt(*c.Stock, 10)
	}
	for _, p := range c.Parts {
		pv := partView{Role: p.Role, Mfr: p.Mfr, MPN: p.MPN, Type: p.Type, Package: p.Package, Supplier: p.Supplier,
			Price: cost(p.UnitPrice, c.Currency), PriceNote: p.PriceNote, Stock: "stock unknown"}
		if p.Stock != nil {
			pv.Stock = "stock " + strconv.FormatInt(*p.Stock, 10)
		}
		if cp := parts[partKey{roleKind(p.Role), catalog.NormKey(p.Mfr), catalog.NormKey(p.MPN)}]; cp != nil {
			pv.Desc, pv.Datasheet = cp.Desc, cp.Datasheet
		}
		cv.Parts = append(cv.Parts, pv)
	}
	if g := c.GateResistor; g != nil {
		cv.GateResistor = fmt.Sprintf("gate resistor %s, %s rated (generic 0805): %s at the highest input, %s at v_max; clamp draws %s at v_nom",
			units.FormatSig(float64(g.Value), units.Resistance, 2), units.Format(float64(g.Rating), units.Power),
			units.Format(float64(g.Power), units.Power), units.Format(float64(g.PowerSteady), units.Power),
			units.Format(float64(g.Quiescent), units.Current))
	}
	if f := float64(c.FaultCurrent); f > 0 {
		cv.Fault = fmt.Sprintf("reversed supply: %s through the shunt diode, %s reverse at the load", units.Format(f, units.Current),
			units.Format(float64(c.ClampVoltage), units.Voltage))
	}
	for _, k := range c.Checks {
		cv.Checks = append(cv.Checks, checkView{Name: k.Name, Role: k.Role, Corner: k.Corner,
			Value: num(k.Value, k.Unit), Limit: k.Op + " " + num(k.Limit, k.Unit), Margin: marginText(k.Margin),
			Formula: k.Formula, Source: k.Source, Note: k.Note, Pass: k.Pass})
	}
	return cv
}

// specRows lists the spec's key values with their units.
func specRows(s *spec.Spec) []kv {
	v := func(x float64) string { return units.Format(x, units.Voltage) }
	a := func(x float64) string { return units.Format(x, units.Current) }
	t := func(x float64) string { return units.Format(x, units.Temperature) }
	yes := func(b bool) string {
		if b {
			return "yes"
		}
		return "no"
	}
	rows := []kv{
		{"supply", "kind", string(s.Supply.Kind), ""},
		{"supply", "v_min / v_nom / v_max", v(s.Supply.VMin) + " / " + v(s.Supply.VNom) + " / " + v(s.Supply.VMax), "steady input range"},
	}
	if s.Supply.VTransient > 0 {
		rows = append(rows, kv{"supply", "v_transient", v(s.Supply.VTransient), "highest short transient"})
	}
	rt := units.Format(s.Supply.ReverseTime, units.Time)
	if s.Supply.ReverseContinuous {
		rt = "continuous"
	}
	rows = append(rows,
		kv{"supply", "v_reverse", v(s.Supply.VReverse), "reversed supply, for " + rt},
		kv{"supply", "r_source", units.Format(s.Supply.RSource, units.Resistance),
			"bolted fault " + units.Format(s.Supply.VReverse/s.Supply.RSource, units.Current)},
		kv{"supply", "shared", yes(s.Supply.Shared), "other loads on this input"},
		kv{"load", "i_max", a(s.Load.IMax), "highest steady load current"},
		kv{"load", "v_min", v(s.Load.VMin), "lowest input the load works at"},
		kv{"load", "v_reverse_max", v(s.Load.VReverseMax), "reverse voltage the load survives"},
		kv{"load", "backfeed", yes(s.Load.Backfeed), ""},
		kv{"load", "v_holdup", v(s.Load.VHoldup), "voltage the load side keeps while reversed"},
	)
	if s.Load.HasInrush {
		rows = append(rows, kv{"load", "inrush", fmt.Sprintf("%s over %s, %g pulses", units.Format(s.Load.InrushI2t, units.I2t),
			units.Format(s.Load.InrushTime, units.Time), s.Load.InrushPulses), ""})
	}
	rows = append(rows, kv{"ambient", "t_min … t_max", t(s.Ambient.TMin) + " … " + t(s.Ambient.TMax), ""})
	if s.Budget.HasDrop {
		rows = append(rows, kv{"budget", "drop_max", v(s.Budget.DropMax), ""})
	}
	if s.Budget.HasLoss {
		rows = append(rows, kv{"budget", "loss_max", units.Format(s.Budget.LossMax, units.Power), ""})
	}
	dl, by := s.DropLimit()
	rows = append(rows, kv{"budget", "drop limit", v(dl), "governed by " + by})
	var rates []string
	for c, r := range s.Build.Rates {
		rates = append(rates, fmt.Sprintf("1 %s = %g %s", c, r, s.Build.Currency))
	}
	sort.Strings(rates)
	rows = append(rows, kv{"build", "quantity", strconv.FormatInt(s.Build.Quantity, 10), "boards"},
		kv{"build", "currency", s.Build.Currency, strings.Join(rates, ", ")})
	return rows
}

// num formats v in unit (a symbol of the results: V, A, W, Ω, °C, A²s,
// s) in engineering notation; "?" when unknown.
func num(v topology.Num, unit string) string {
	f := float64(v)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return "?"
	}
	for _, d := range units.AllDims() {
		if d != units.None && d.Symbol() == unit {
			return units.Format(f, d)
		}
	}
	s := units.Format(f, units.None)
	if unit != "" {
		s += " " + unit
	}
	return s
}

func marginText(m topology.Num) string {
	f := float64(m)
	switch {
	case math.IsNaN(f):
		return "?"
	case math.IsInf(f, -1):
		return "fails (no stable point)"
	}
	return pct(f)
}

// cost writes a price in the build currency, up to four decimals.
func cost(v topology.Num, cur string) string {
	f := float64(v)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return "not costed"
	}
	s := strconv.FormatFloat(f, 'f', 4, 64)
	s = strings.TrimRight(s, "0")
	if i := strings.IndexByte(s, '.'); i < 0 {
		s += ".00"
	} else if len(s)-i-1 < 2 {
		s += strings.Repeat("0", 2-(len(s)-i-1))
	}
	return s + " " + cur
}
