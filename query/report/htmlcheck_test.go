package report

import (
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"regexp"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

// parsed is what the checks of a report page found.
type parsed struct {
	svgs     int
	svgText  []string // text of every <text> inside an svg, in order
	text     string   // all text of the page, unescaped, joined by newlines
	pre      []string // text of every <pre>
	problems []string
}

// forbidden elements: anything that runs, loads or embeds.
var forbidden = map[string]bool{
	"script": true, "iframe": true, "object": true, "embed": true, "img": true, "image": true,
	"link": true, "base": true, "form": true, "input": true, "foreignobject": true, "use": true,
	"video": true, "audio": true, "source": true, "frame": true, "frameset": true, "applet": true,
}

var cssURL = regexp.MustCompile(`(?i)url\(\s*([^)\s]{0,16})`)

// checkPage parses an HTML report page and reports everything that would
// run, load or refer outside the file, with the text it holds.
func checkPage(t testing.TB, b []byte) parsed {
	t.Helper()
	var out parsed
	// every token must read without error
	z := html.NewTokenizer(bytes.NewReader(b))
	for {
		if z.Next() == html.ErrorToken {
			if !errors.Is(z.Err(), io.EOF) {
				t.Fatalf("tokenizer: %v", z.Err())
			}
			break
		}
	}
	doc, err := html.Parse(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("parse: %v", err)
	}
	var texts []string
	var walk func(n *html.Node, inSVG, inText, inPre bool, pre *strings.Builder)
	walk = func(n *html.Node, inSVG, inText, inPre bool, pre *strings.Builder) {
		switch n.Type {
		case html.ElementNode:
			name := strings.ToLower(n.Data)
			if forbidden[name] {
				out.problems = append(out.problems, "element <"+name+">")
			}
			for _, a := range n.Attr {
				k := strings.ToLower(a.Key)
				v := strings.ToLower(a.Val)
				switch {
				case strings.HasPrefix(k, "on"):
					out.problems = append(out.problems, "event attribute "+k+" on <"+name+">")
				case k == "src" || k == "srcset" || k == "action" || k == "formaction":
					out.problems = append(out.problems, "attribute "+k+" on <"+name+">")
				case k == "href" && !strings.HasPrefix(v, "#"):
					out.problems = append(out.problems, "link "+a.Val)
				case strings.Contains(v, "http://") || strings.Contains(v, "https://") || strings.Contains(v, "javascript:"):
					out.problems = append(out.problems, "URL in attribute "+k+" of <"+name+">: "+a.Val)
				}
				if k == "style" {
					for _, m := range cssURL.FindAllStringSubmatch(a.Val, -1) {
						out.problems = append(out.problems, "url() in a style attribute: "+m[0])
					}
				}
			}
			if name == "style" && n.FirstChild != nil {
				for _, m := range cssURL.FindAllStringSubmatch(n.FirstChild.Data, -1) {
					if !strings.HasPrefix(strings.ToLower(m[1]), "data:") {
						out.problems = append(out.problems, "url() in the style sheet: "+m[0])
					}
				}
			}
			if name == "svg" && n.Namespace == "svg" {
				out.svgs++
				inSVG = true
			}
			if inSVG && name == "text" {
				inText = true
			}
			if name == "pre" {
				var sb strings.Builder
				for c := n.FirstChild; c != nil; c = c.NextSibling {
					walk(c, inSVG, inText, true, &sb)
				}
				out.pre = append(out.pre, sb.String())
				return
			}
		case html.TextNode:
			texts = append(texts, n.Data)
			if inText {
				out.svgText = append(out.svgText, n.Data)
			}
			if inPre {
				pre.WriteString(n.Data)
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c, inSVG, inText, inPre, pre)
		}
	}
	walk(doc, false, false, false, nil)
	out.text = strings.Join(texts, "\n")
	// every inline SVG is well-formed XML on its own
	raw := string(b)
	for i := 0; ; {
		j := strings.Index(raw[i:], "<svg ")
		if j < 0 {
			break
		}
		k := strings.Index(raw[i+j:], "</svg>")
		if k < 0 {
			t.Fatal("svg without an end tag")
		}
		frag := raw[i+j : i+j+k+len("</svg>")]
		d := xml.NewDecoder(strings.NewReader(frag))
		for {
			if _, err := d.Token(); err != nil {
				if !errors.Is(err, io.EOF) {
					t.Errorf("inline svg is not well-formed XML: %v", err)
				}
				break
			}
		}
		i += j + k
	}
	return out
}
