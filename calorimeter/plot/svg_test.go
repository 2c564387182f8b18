package plot

import (
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"strconv"
	"strings"
	"testing"
)

// svgDoc is what the tests read back from an SVG document: every <path>
// and the text of every <text> element.
type svgDoc struct {
	paths []svgPath
	texts []string
}

type svgPath struct{ d, style string }

// parseSVG decodes the whole document with encoding/xml (strict mode), so
// any malformed markup fails the test.
func parseSVG(t *testing.T, b []byte) svgDoc {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(b))
	var doc svgDoc
	var inText bool
	var text strings.Builder
	depth, root := 0, ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			if depth == 0 {
				root = e.Name.Local
			}
			depth++
			switch e.Name.Local {
			case "path":
				var p svgPath
				for _, a := range e.Attr {
					switch a.Name.Local {
					case "d":
						p.d = a.Value
					case "style":
						p.style = a.Value
					}
				}
				doc.paths = append(doc.paths, p)
			case "text":
				inText = true
				text.Reset()
			}
		case xml.CharData:
			if inText {
				text.Write(e)
			}
		case xml.EndElement:
			depth--
			if e.Name.Local == "text" {
				inText = false
				doc.texts = append(doc.texts, text.String())
			}
		}
	}
	if root != "svg" || depth != 0 {
		t.Fatalf("SVG root element %q, depth at end %d", root, depth)
	}
	return doc
}

// prop returns a property of the style attribute; SVG's defaults (black
// fill, no stroke) apply when it is absent, as vgsvg leaves defaults out.
func (p svgPath) prop(name string) string {
	for _, kv := range strings.Split(p.style, ";") {
		k, v, _ := strings.Cut(kv, ":")
		if strings.TrimSpace(k) == name {
			return strings.TrimSpace(v)
		}
	}
	switch name {
	case "fill":
		return "#000000"
	case "stroke":
		return "none"
	}
	return ""
}

// isDot reports a filled circle of colour c (vgsvg draws a circle as two
// arcs).
func (p svgPath) isDot(c string) bool {
	return strings.Count(p.d, "A") == 2 && p.prop("fill") == c && p.prop("stroke") == "none"
}

// vertices parses the M and L points of a path of straight segments.
func (p svgPath) vertices() [][2]float64 {
	var out [][2]float64
	for _, f := range strings.FieldsFunc(p.d, func(r rune) bool { return r == 'M' || r == 'L' || r == 'Z' }) {
		xs, ys, ok := strings.Cut(f, ",")
		if !ok {
			return nil
		}
		x, err1 := strconv.ParseFloat(xs, 64)
		y, err2 := strconv.ParseFloat(ys, 64)
		if err1 != nil || err2 != nil {
			return nil
		}
		out = append(out, [2]float64{x, y})
	}
	return out
}

// segments returns the two-point stroked paths of colour c, solid or dashed.
func (d svgDoc) segments(c string, dashed bool) [][2][2]float64 {
	var out [][2][2]float64
	for _, p := range d.paths {
		if p.prop("stroke") != c || strings.Contains(p.style, "dasharray") != dashed {
			continue
		}
		if v := p.vertices(); len(v) == 2 && strings.Count(p.d, "M") == 1 {
			out = append(out, [2][2]float64{v[0], v[1]})
		}
	}
	return out
}

func (d svgDoc) count(match func(svgPath) bool) int {
	n := 0
	for _, p := range d.paths {
		if match(p) {
			n++
		}
	}
	return n
}

func (d svgDoc) hasText(s string) bool {
	for _, t := range d.texts {
		if strings.Contains(t, s) {
			return true
		}
	}
	return false
}

// failWriter fails every write.
type failWriter struct{}

var errFull = errors.New("disk full")

func (failWriter) Write([]byte) (int, error) { return 0, errFull }

// near reports whether two #RRGGBB colours differ by at most 2 in each
// channel: vgsvg truncates the channels of translucent colours.
func near(a, b string) bool {
	if len(a) != 7 || len(b) != 7 {
		return false
	}
	for k := 1; k < 7; k += 2 {
		x, err1 := strconv.ParseUint(a[k:k+2], 16, 8)
		y, err2 := strconv.ParseUint(b[k:k+2], 16, 8)
		if err1 != nil || err2 != nil || max(x, y)-min(x, y) > 2 {
			return false
		}
	}
	return true
}
