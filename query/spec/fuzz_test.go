package spec

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzParseSpec checks that no input makes Parse panic, that a failure is
// always an *Error with at least one problem naming the file, and that an
// accepted spec holds finite, consistent values.
func FuzzParseSpec(f *testing.F) {
	f.Add(Template())
	f.Add(minimal)
	f.Add(strings.Replace(minimal, "i_max = 1", "i_mx = 1", 1))
	f.Add(strings.Replace(minimal, "v_max = 14", `v_max = "14 A"`, 1))
	f.Add(minimal + "[policy]\nderating = \"x\"\n[policy.profiles.x]\nbase = \"industrial\"\nk_vds = 0.5\n")
	f.Add(minimal + "[build.rates]\nUSD = 0.9\n")
	f.Add("[supply]\nv_min = \"\"\"\nx\n\"\"\"\n")
	f.Add("a.b.c = [1,\n[2,\n3]]\n[[x]]\n")
	f.Add("[policy.profiles]\nx = 3\n")
	f.Add("")
	files, _ := filepath.Glob("../../seeddata/specs/*.toml")
	for _, name := range files {
		if data, err := os.ReadFile(name); err == nil {
			f.Add(string(data))
		}
	}
	f.Fuzz(func(t *testing.T, src string) {
		s, err := Parse("f.toml", []byte(src))
		if err != nil {
			var se *Error
			if !errors.As(err, &se) || len(se.Problems) == 0 {
				t.Fatalf("error is not a non-empty *Error: %v", err)
			}
			for _, p := range se.Problems {
				if p.File != "f.toml" || p.Msg == "" || p.Line < 0 {
					t.Fatalf("bad problem %+v", p)
				}
			}
			return
		}
		for _, v := range []float64{s.Supply.VMin, s.Supply.VNom, s.Supply.VMax, s.Supply.VReverse, s.Supply.RSource,
			s.Load.IMax, s.Load.VMin, s.Load.VReverseMax, s.Ambient.TMin, s.Ambient.TMax} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("non-finite value accepted: %+v", s)
			}
		}
		if s.Supply.VMin > s.Supply.VMax || s.Ambient.TMin > s.Ambient.TMax || s.Load.VMin >= s.Supply.VMin ||
			s.Supply.RSource <= 0 || s.Load.IMax <= 0 || s.Build.Quantity < 1 {
			t.Fatalf("inconsistent spec accepted: %+v", s)
		}
		if s.Policy.Profile.Name == "" {
			t.Fatalf("no profile resolved")
		}
	})
}
