package report

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"html"
	"html/template"
	"io"
	"strings"
)

// svgElements are the SVG elements a plot may hold: what the vgsvg
// backend of gonum/plot writes for paths and text. Anything else (script,
// foreignObject, image, a, use, style) is refused.
var svgElements = map[string]bool{
	"svg": true, "g": true, "path": true, "text": true,
	"rect": true, "line": true, "polyline": true, "polygon": true, "circle": true,
}

// svgAttrs are the attributes kept; namespace declarations are dropped
// (an inline SVG in HTML takes its namespace from the parser), and any
// other attribute (event handlers, href) is refused.
var svgAttrs = map[string]bool{
	"width": true, "height": true, "viewBox": true, "x": true, "y": true,
	"d": true, "transform": true, "style": true, "fill": true, "stroke": true,
}

// cleanSVG rewrites the SVG document raw for inline use in HTML: the XML
// prolog and comments are dropped, every element and attribute is checked
// against an allow-list, text and attribute values are escaped again, and
// the root element gets class and an accessible label. It never passes
// markup through unchecked: the output is rebuilt from the parsed tokens,
// so text that came from the catalog (part numbers in legends) can only
// appear as escaped character data. An error names what was refused.
func cleanSVG(raw []byte, label string) (template.HTML, error) {
	d := xml.NewDecoder(bytes.NewReader(raw))
	d.Strict = true
	var b strings.Builder
	var stack []string // open elements: RawToken does not match them
	roots := 0
	for {
		tok, err := d.RawToken()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return "", fmt.Errorf("svg: %w", err)
		}
		switch t := tok.(type) {
		case xml.StartElement:
			name := t.Name.Local
			if t.Name.Space != "" || !svgElements[name] {
				return "", fmt.Errorf("svg: element %q not allowed", qname(t.Name))
			}
			depth := len(stack)
			if depth == 0 {
				if name != "svg" || roots > 0 {
					return "", fmt.Errorf("svg: the document must have one svg root, got %q", name)
				}
				roots++
			} else if name == "svg" {
				return "", errors.New("svg: nested svg element")
			}
			b.WriteString("<" + name)
			if depth == 0 {
				b.WriteString(` class="plot" role="img" aria-label="` + html.EscapeString(label) + `"`)
			}
			for _, a := range t.Attr {
				if a.Name.Space == "xmlns" || a.Name.Space == "" && a.Name.Local == "xmlns" {
					continue
				}
				if a.Name.Space != "" || !svgAttrs[a.Name.Local] {
					return "", fmt.Errorf("svg: attribute %q on %s not allowed", qname(a.Name), name)
				}
				if a.Name.Local == "style" {
					if err := checkStyle(a.Value); err != nil {
						return "", err
					}
				}
				b.WriteString(" " + a.Name.Local + `="` + html.EscapeString(a.Value) + `"`)
			}
			b.WriteString(">")
			stack = append(stack, name)
		case xml.EndElement:
			if len(stack) == 0 || t.Name.Space != "" || stack[len(stack)-1] != t.Name.Local {
				return "", fmt.Errorf("svg: unexpected end element %q", qname(t.Name))
			}
			stack = stack[:len(stack)-1]
			b.WriteString("</" + t.Name.Local + ">")
		case xml.CharData:
			if len(stack) == 0 {
				if len(bytes.TrimSpace(t)) > 0 {
					return "", errors.New("svg: text outside the root element")
				}
				continue
			}
			b.WriteString(html.EscapeString(string(t)))
		case xml.Comment, xml.ProcInst, xml.Directive:
			// dropped
		}
	}
	if roots != 1 || len(stack) != 0 {
		return "", errors.New("svg: incomplete document")
	}
	return template.HTML(b.String()), nil
}

func qname(n xml.Name) string {
	if n.Space == "" {
		return n.Local
	}
	return n.Space + ":" + n.Local
}

// checkStyle refuses style values that could load or run anything:
// url() references, imports, expressions, escapes and markup.
func checkStyle(v string) error {
	l := strings.ToLower(v)
	for _, bad := range []string{"url(", "@import", "expression", "\\", "<", ">", "javascript:", "image-set", "src("} {
		if strings.Contains(l, bad) {
			return fmt.Errorf("svg: style %q not allowed (%s)", v, bad)
		}
	}
	return nil
}
