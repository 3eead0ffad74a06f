package where

import (
	"math"
	"strings"
	"testing"

	"partsieve/catalog"
)

func TestParse(t *testing.T) {
	tests := []struct {
		expr string
		want []catalog.Cond
	}{
		{"vds>=40V", []catalog.Cond{{Field: "vds", Op: ">=", Num: 40}}},
		{"vds >= 40 V", []catalog.Cond{{Field: "vds", Op: ">=", Num: 40}}},
		{"rdson<=20m", []catalog.Cond{{Field: "rdson", Op: "<=", Num: 0.020}}},
		{"rdson<=20mΩ", []catalog.Cond{{Field: "rdson", Op: "<=", Num: 0.020}}},
		{"rdson<20 mOhm", []catalog.Cond{{Field: "rdson", Op: "<", Num: 0.020}}},
		{"ifav>1.5A", []catalog.Cond{{Field: "ifav", Op: ">", Num: 1.5}}},
		{"ir<=50u", []catalog.Cond{{Field: "ir", Op: "<=", Num: 50e-6}}},
		{"i2t>=10A2s", []catalog.Cond{{Field: "i2t", Op: ">=", Num: 10}}},
		{"tjmax>=150", []catalog.Cond{{Field: "tjmax", Op: ">=", Num: 150}}},
		{"tjmax>=150°C", []catalog.Cond{{Field: "tjmax", Op: ">=", Num: 150}}},
		{"vrrm>=0,1kV", []catalog.Cond{{Field: "vrrm", Op: ">=", Num: 100}}},
		{"type=schottky", []catalog.Cond{{Field: "type", Op: "=", Text: "schottky"}}},
		{"type=Schottky", []catalog.Cond{{Field: "type", Op: "=", Text: "schottky"}}},
		{"type=p-ch", []catalog.Cond{{Field: "type", Op: "=", Text: "p"}}},
		{"type=tt", []catalog.Cond{{Field: "type", Op: "=", Text: "TT"}}},
		{"package~SOD", []catalog.Cond{{Field: "package", Op: "~", Text: "SOD"}}},
		{"lifecycle!=obsolete", []catalog.Cond{{Field: "lifecycle", Op: "!=", Text: "obsolete"}}},
		{"aecq=yes", []catalog.Cond{{Field: "aecq", Op: "=", Num: 1, Text: "yes"}}},
		{"rohs==no", []catalog.Cond{{Field: "rohs", Op: "=", Num: 0, Text: "no"}}},
		{"VDS>=40V and rdson<=0.02", []catalog.Cond{{Field: "vds", Op: ">=", Num: 40}, {Field: "rdson", Op: "<=", Num: 0.02}}},
		{"kind=fuse && in>=2A", []catalog.Cond{{Field: "kind", Op: "=", Text: "fuse"}, {Field: "in", Op: ">=", Num: 2}}},
	}
	for _, tt := range tests {
		got, err := Parse(tt.expr)
		if err != nil {
			t.Errorf("Parse(%q): %v", tt.expr, err)
			continue
		}
		if len(got) != len(tt.want) {
			t.Errorf("Parse(%q) = %+v, want %+v", tt.expr, got, tt.want)
			continue
		}
		for i := range got {
			g, w := got[i], tt.want[i]
			if g.Field != w.Field || g.Op != w.Op || g.Text != w.Text || math.Abs(g.Num-w.Num) > 1e-12*math.Max(1, math.Abs(w.Num)) {
				t.Errorf("Parse(%q)[%d] = %+v, want %+v", tt.expr, i, g, w)
			}
		}
	}
}

func TestParseErrors(t *testing.T) {
	tests := []struct{ expr, want string }{
		{"vds>=3A", "voltage"},
		{"rdson<=5V", "resistance"},
		{"vdss>=40", "did you mean vds"},
		{"foo=1", "unknown field"},
		{"vds 40", "no operator"},
		{"vds>=", "missing value"},
		{">=40", "missing field"},
		{"type=banana", "must be one of"},
		{"vds~40", "is a number"},
		{"rohs>1", "yes/no"},
		{"vds>=forty", "voltage"},
		{"", "empty condition"},
		{"vds>=40V and", "empty condition"},
	}
	for _, tt := range tests {
		_, err := Parse(tt.expr)
		if err == nil {
			t.Errorf("Parse(%q): no error, want one containing %q", tt.expr, tt.want)
			continue
		}
		if !strings.Contains(err.Error(), tt.want) {
			t.Errorf("Parse(%q) error %q, want it to contain %q", tt.expr, err, tt.want)
		}
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{"vds>=40V", "rdson<=20m", "type=schottky", "package~SOD", "a and b", "x&&y", "tjmax>=-40 °C", "i2t>=1e3A²s", "rohs=yes"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		cs, err := Parse(s)
		if err != nil {
			return
		}
		for _, c := range cs {
			if _, ok := catalog.FieldByName(c.Field); !ok {
				t.Fatalf("Parse(%q) gave unknown field %q", s, c.Field)
			}
			if math.IsNaN(c.Num) || math.IsInf(c.Num, 0) {
				t.Fatalf("Parse(%q) gave non-finite %v", s, c.Num)
			}
		}
	})
}
