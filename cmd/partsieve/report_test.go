package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"partsieve/query/topology"
	"partsieve/seeddata"
)

// reportSummary parses a report page and returns its inline SVG count,
// its text, and whatever in it would run or load.
func reportSummary(t *testing.T, b []byte) (svgs int, text string, bad []string) {
	t.Helper()
	doc, err := html.Parse(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("report does not parse: %v", err)
	}
	var sb strings.Builder
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		switch n.Type {
		case html.ElementNode:
			switch n.Data {
			case "svg":
				svgs++
			case "script", "img", "iframe", "object", "embed", "link", "image", "foreignObject":
				bad = append(bad, "<"+n.Data+">")
			}
			for _, a := range n.Attr {
				v := strings.ToLower(a.Val)
				if strings.HasPrefix(a.Key, "on") || a.Key == "src" || a.Key == "href" && !strings.HasPrefix(v, "#") ||
					strings.Contains(v, "http://") || strings.Contains(v, "https://") {
					bad = append(bad, a.Key+"="+a.Val)
				}
			}
		case html.TextNode:
			sb.WriteString(n.Data)
			sb.WriteByte('\n')
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	return svgs, sb.String(), bad
}

// `pick NAME --report FILE` for the three example specs against the seed
// catalog: the terminal output is the same as without --report, stderr
// says where the report went, and the report parses, holds three plots
// per topology with designs, the designs' part numbers and the cautions,
// and refers to nothing outside the file.
func TestPickReportExamples(t *testing.T) {
	db := newDB(t)
	dir := t.TempDir()
	for _, name := range seeddata.SpecNames() {
		t.Run(name, func(t *testing.T) {
			plain, _, code0 := runCLI(t, db, "pick", name)
			file := filepath.Join(dir, name+".html")
			out, errs, code := runCLI(t, db, "pick", name, "--report", file)
			if code != code0 || (code != 0 && code != exitNoMatch) {
				t.Fatalf("pick --report: code %d (without: %d); stderr %s", code, code0, errs)
			}
			if out != plain {
				t.Error("the terminal output changes with --report")
			}
			if !strings.Contains(errs, "report written to "+file) {
				t.Errorf("stderr = %q, want it to say where the report went", errs)
			}
			b, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			svgs, text, bad := reportSummary(t, b)
			for _, x := range bad {
				t.Errorf("report holds %s", x)
			}
			designs := 0
			for _, line := range strings.Split(plain, "\n") {
				if strings.HasPrefix(line, "  1  ") {
					designs++ // rank 1 of a topology's table
				}
			}
			if designs == 0 || svgs != 3*designs {
				t.Errorf("%d svg plots for %d topologies with designs, want 3 each", svgs, designs)
			}
			for _, c := range topology.Cautions {
				if !strings.Contains(text, c) {
					t.Errorf("report lacks the caution %q", c)
				}
			}
			// every part number of the terminal's comparison is in the report
			inCmp, rows := false, 0
			for _, line := range strings.Split(plain, "\n") {
				if strings.HasPrefix(line, "Best of each topology") {
					inCmp = true
					continue
				}
				if inCmp && line == "" {
					break // the table ends
				}
				if !inCmp || strings.HasPrefix(line, "  TOPOLOGY") {
					continue
				}
				rows++
				f := strings.Fields(line)
				if len(f) > 2 && f[1] != "none" && !strings.Contains(text, f[2]) {
					t.Errorf("part %s of the comparison not in the report", f[2])
				}
			}
			if rows != 4 {
				t.Errorf("read %d comparison rows from the terminal output, want 4", rows)
			}
		})
	}
}

func TestPickReportRefusals(t *testing.T) {
	db := newDB(t)
	dir := t.TempDir()
	// a directory
	_, errs, code := runCLI(t, db, "pick", "sensor-24v-industrial", "--report", dir)
	if code != exitError || !strings.Contains(errs, "is a directory") {
		t.Errorf("--report DIR: code %d, stderr %q", code, errs)
	}
	// a symbolic link
	target := filepath.Join(dir, "target.html")
	if err := os.WriteFile(target, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.html")
	if err := os.Symlink(target, link); err != nil {
		t.Skip("no symbolic links here:", err)
	}
	_, errs, code = runCLI(t, db, "pick", "sensor-24v-industrial", "--report", link)
	if code != exitError || !strings.Contains(errs, "symbolic link") {
		t.Errorf("--report LINK: code %d, stderr %q", code, errs)
	}
	if b, _ := os.ReadFile(target); string(b) != "keep" {
		t.Error("the link's target was overwritten")
	}
	// with --explain
	_, errs, code = runCLI(t, db, "pick", "sensor-24v-industrial", "--explain", "QPS30-40C", "--report", filepath.Join(dir, "r.html"))
	if code != exitUsage || !strings.Contains(errs, "--report and --explain") {
		t.Errorf("--report with --explain: code %d, stderr %q", code, errs)
	}
	// nothing qualifies: exit 4, the report is still written, without plots
	none := filepath.Join(dir, "none.html")
	_, errs, code = runCLI(t, db, "pick", "vehicle-12v-accessory", "--topology", "series-diode", "--report", none)
	if code != exitNoMatch || !strings.Contains(errs, "report written to "+none) {
		t.Errorf("--report when nothing qualifies: code %d, stderr %q", code, errs)
	}
	if b, err := os.ReadFile(none); err != nil {
		t.Error(err)
	} else if svgs, text, _ := reportSummary(t, b); svgs != 0 || !strings.Contains(text, "no part qualifies") {
		t.Errorf("report when nothing qualifies: %d plots, reason shown: %v", svgs, strings.Contains(text, "no part qualifies"))
	}
	// no temporary file left behind
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.Contains(e.Name(), ".tmp") {
			t.Errorf("temporary file %s left", e.Name())
		}
	}
}
