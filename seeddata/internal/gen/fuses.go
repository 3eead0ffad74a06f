package gen

import (
	"fmt"
	"math"
	"strings"

	"partsieve/catalog"
)

// fuseFamily is one invented fuse series.
//
// Melting I²t is modelled as i2t = kI2t·I_N² (A²s): the fuse element's
// cross-section grows with the rating, so the adiabatic melting integral
// scales with I_N². The constants per speed class are invented for demo
// (REFERENCE gives no nominal I²t figures), chosen so that a 5 A
// quick-acting 5x20 fuse melts at about 15 A²s and a 5 A time-lag one at
// about 75 A²s; thin-film SMD elements are lighter still.
//
// Cold resistance is rcold = r1·I_N^−1.15 (Ω): about 0.1–0.15 Ω at 1 A and
// 6–10 mΩ at 10 A, falling slightly faster than 1/I_N so that the rated
// voltage drop I_N·rcold shrinks from ~0.15 V to ~0.1 V over the range
// (invented for demo, typical datasheet levels).
type fuseFamily struct {
	m        maker
	typ      string // IEC 60127 speed letter; blade fuses have none, they get M (slow-blow blades T)
	std      string // iec, ul, blade
	pkg      string
	prefix   string // part number prefix; the rating code follows
	lead     string // description lead
	ratings  []float64
	kI2t     float64 // A²s per A²
	clear    float64 // i2t_clear/i2t; 0 = not published
	r1       float64 // Ω at 1 A
	unAC     func(in float64) float64
	unDC     func(in float64) float64
	breaking func(in float64) float64
	tail     string // standard words at the end of the description
	rerate   string
	aecq     bool
	price    float64 // EUR at 1000+, scaled by (1 + I_N/40)
}

func volts(v float64) func(float64) float64 { return func(float64) float64 { return v } }

func none(float64) float64 { return 0 }

// iecLowBreaking is the rated breaking capacity of IEC 60127-2 low-breaking
// (glass) fuse-links at 250 V AC: 35 A or 10·I_N, whichever is larger
// (REFERENCE §4.1, Sheet 3).
func iecLowBreaking(in float64) float64 { return math.Max(35, 10*in) }

// ulBreaking is the UL 248-14 minimum interrupting rating at 250 V AC by
// rating (REFERENCE §4.2).
func ulBreaking(in float64) float64 {
	switch {
	case in <= 1:
		return 35
	case in <= 3.5:
		return 100
	case in <= 10:
		return 200
	case in <= 15:
		return 750
	}
	return 1500
}

// Blade fuses: 32 V DC and 1000 A breaking capacity (REFERENCE §4.5,
// ISO 8820-3 scope).
const (
	bladeUn       = 32
	bladeBreaking = 1000
)

var fuseFamilies = []fuseFamily{
	{m: saltmarsh, typ: "F", std: "iec", pkg: "5x20 mm glass", prefix: "SFG-F-",
		lead:    "Cartridge fuse 5x20 mm glass, quick-acting (F)",
		ratings: []float64{0.5, 1, 1.6, 2, 3.15, 5, 6.3, 10}, kI2t: 0.6, clear: 1.8, r1: 0.14,
		unAC: volts(250), unDC: none, breaking: iecLowBreaking,
		tail: "low breaking capacity, IEC 60127-2", rerate: "25:1, 70:0.9, 100:0.8", price: 0.09},
	{m: saltmarsh, typ: "T", std: "iec", pkg: "5x20 mm glass", prefix: "SFG-T-",
		lead:    "Cartridge fuse 5x20 mm glass, time-lag (T)",
		ratings: []float64{0.5, 0.63, 1, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 10}, kI2t: 3.0, r1: 0.10,
		unAC: volts(250), unDC: none, breaking: iecLowBreaking,
		tail: "low breaking capacity, IEC 60127-2", rerate: "25:1, 70:0.88, 100:0.76", price: 0.09},
	{m: saltmarsh, typ: "T", std: "iec", pkg: "5x20 mm ceramic", prefix: "SFC-T-",
		lead:    "Cartridge fuse 5x20 mm ceramic, sand-filled, time-lag (T)",
		ratings: []float64{1, 2, 3.15, 5, 10, 16}, kI2t: 3.5, r1: 0.10,
		unAC: volts(250), unDC: volts(125), breaking: func(float64) float64 { return 1500 },
		tail: "high breaking capacity 1500 A, IEC 60127-2", price: 0.20},
	{m: elderline, typ: "FF", std: "iec", pkg: "5x20 mm glass", prefix: "EPG-FF-",
		lead:    "Cartridge fuse 5x20 mm glass, very fast-acting (FF), semiconductor protection",
		ratings: []float64{1, 2}, kI2t: 0.12, clear: 1.5, r1: 0.18,
		unAC: volts(250), unDC: none, breaking: iecLowBreaking, tail: "IEC 60127-2", price: 0.14},
	{m: elderline, typ: "M", std: "iec", pkg: "5x20 mm glass", prefix: "EPG-M-",
		lead:    "Cartridge fuse 5x20 mm glass, medium time-lag (M)",
		ratings: []float64{1, 2.5}, kI2t: 1.5, r1: 0.12,
		unAC: volts(250), unDC: none, breaking: iecLowBreaking, tail: "IEC 60127-2", price: 0.11},
	{m: elderline, typ: "TT", std: "iec", pkg: "5x20 mm glass", prefix: "EPG-TT-",
		lead:    "Cartridge fuse 5x20 mm glass, long time-lag (TT) for high inrush",
		ratings: []float64{0.5, 1, 2, 4}, kI2t: 6.0, r1: 0.09,
		unAC: volts(250), unDC: none, breaking: iecLowBreaking, tail: "IEC 60127-2", price: 0.12},
	{m: hollin, typ: "F", std: "ul", pkg: "6.3x32 mm glass", prefix: "HCP632-F-",
		lead:    "Cartridge fuse 6.3x32 mm glass, fast-acting",
		ratings: []float64{1, 2, 3, 5, 10, 15, 30}, kI2t: 0.7, r1: 0.14,
		unAC: volts(250), unDC: volts(32), breaking: ulBreaking, tail: "UL 248-14", price: 0.25},
	{m: hollin, typ: "T", std: "ul", pkg: "6.3x32 mm glass", prefix: "HCP632-T-",
		lead:    "Cartridge fuse 6.3x32 mm glass, time-delay",
		ratings: []float64{0.5, 1, 2, 5, 10, 15}, kI2t: 3.5, r1: 0.10,
		unAC: volts(250), unDC: func(in float64) float64 {
			if in <= 5 {
				return 125
			}
			return 63
		}, breaking: ulBreaking, tail: "UL 248-14", rerate: "25:1, 60:0.9, 85:0.82", price: 0.30},
	{m: hollin, typ: "F", std: "ul", pkg: "SMD 1206", prefix: "HCS1206-F-",
		lead:    "Surface-mount thin-film chip fuse 1206, fast-acting",
		ratings: []float64{0.5, 0.75, 1, 1.5, 2, 3, 5}, kI2t: 0.25, clear: 1.5, r1: 0.16,
		unAC: none, unDC: func(in float64) float64 {
			if in <= 2 {
				return 63
			}
			return 32
		}, breaking: func(float64) float64 { return 50 },
		tail: "UL 248-14, AEC-Q200", rerate: "25:1, 65:0.9, 85:0.8, 105:0.7", aecq: true, price: 0.12},
	{m: elderline, typ: "T", std: "ul", pkg: "SMD 2410", prefix: "EPS2410-T-",
		lead:    "Surface-mount ceramic fuse 2410, time-lag",
		ratings: []float64{0.5, 1, 2, 3, 5, 7}, kI2t: 2.0, r1: 0.12,
		unAC: func(in float64) float64 {
			if in <= 3 {
				return 125
			}
			return 0
		}, unDC: func(in float64) float64 {
			if in <= 3 {
				return 125
			}
			return 63
		}, breaking: func(in float64) float64 {
			if in <= 3 {
				return 100 // at 125 V
			}
			return 300 // at 63 V
		},
		tail: "UL 248-14", rerate: "25:1, 60:0.83, 85:0.75", price: 0.30},
	{m: brackwtr, typ: "M", std: "blade", pkg: "blade regular", prefix: "BWB-R",
		lead:    "Automotive blade fuse, regular size",
		ratings: []float64{1, 2, 3, 5, 7.5, 10, 15, 20, 25, 30, 35, 40}, kI2t: 2.0, clear: 1.3, r1: 0.09,
		unAC: none, unDC: volts(bladeUn), breaking: func(float64) float64 { return bladeBreaking },
		tail: "ISO 8820-3 style", rerate: "25:1, 65:0.92, 85:0.85, 105:0.78", price: 0.06},
	{m: brackwtr, typ: "M", std: "blade", pkg: "blade mini", prefix: "BWB-N",
		lead:    "Automotive blade fuse, mini size",
		ratings: []float64{2, 5, 7.5, 10, 15, 20, 30}, kI2t: 2.0, r1: 0.09,
		unAC: none, unDC: volts(bladeUn), breaking: func(float64) float64 { return bladeBreaking },
		tail: "ISO 8820-3 style", rerate: "25:1, 65:0.92, 85:0.85, 105:0.78", price: 0.05},
	{m: brackwtr, typ: "M", std: "blade", pkg: "blade low-profile", prefix: "BWB-L",
		lead:    "Automotive blade fuse, low-profile mini size",
		ratings: []float64{5, 10, 15, 20}, kI2t: 2.0, r1: 0.09,
		unAC: none, unDC: volts(bladeUn), breaking: func(float64) float64 { return bladeBreaking },
		tail: "ISO 8820-3 style", price: 0.07},
	{m: brackwtr, typ: "T", std: "blade", pkg: "blade regular", prefix: "BWB-RS",
		lead:    "Automotive blade fuse, regular size, slow-blow (time-delay) for motor loads",
		ratings: []float64{20, 30}, kI2t: 5.0, r1: 0.08,
		unAC: none, unDC: volts(bladeUn), breaking: func(float64) float64 { return bladeBreaking },
		tail: "ISO 8820-3 style", price: 0.25},
}

// ratingCode writes a fuse rating for part numbers: 0.5 → "500m",
// 3.15 → "3A15", 10 → "10A".
func ratingCode(in float64) string {
	if in < 1 {
		return fmt.Sprintf("%dm", int(math.Round(in*1000)))
	}
	s := g(in)
	if i := strings.IndexByte(s, '.'); i >= 0 {
		return s[:i] + "A" + s[i+1:]
	}
	return s + "A"
}

func fuses() []catalog.Part {
	var out []catalog.Part
	for _, f := range fuseFamilies {
		for _, in := range f.ratings {
			ac, dc := f.unAC(in), f.unDC(in)
			var vtext string
			switch {
			case ac > 0 && dc > 0 && ac == dc:
				vtext = g(ac) + " V AC/DC"
			case ac > 0 && dc > 0:
				vtext = g(ac) + " V AC / " + g(dc) + " V DC"
			case ac > 0:
				vtext = g(ac) + " V AC"
			default:
				vtext = g(dc) + " V DC"
			}
			desc := fmt.Sprintf("%s, %s A %s, %s", f.lead, g(in), vtext, f.tail)
			p := newPart(catalog.Fuse, f.typ, f.m, f.prefix+ratingCode(in), f.pkg, desc, f.aecq)
			p.FuseStd = f.std
			p.Rerate = f.rerate
			i2t := roundSig(f.kI2t*in*in, 2)
			vals := map[string]float64{
				"in":       in,
				"breaking": f.breaking(in),
				"i2t":      i2t,
				"rcold":    roundSig(f.r1*math.Pow(in, -1.15), 2),
			}
			if ac > 0 {
				vals["un_ac"] = ac
			}
			if dc > 0 {
				vals["un_dc"] = dc
			}
			if f.clear > 0 {
				// clearing adds the arcing integral to the melting one
				vals["i2t_clear"] = roundSig(i2t*f.clear, 2)
			}
			set(&p, vals)
			addOffers(&p, f.price*(1+in/40))
			out = append(out, p)
		}
	}
	return out
}
