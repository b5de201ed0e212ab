package htmlpage

import (
	"fmt"
	"strconv"
	"strings"
)

// Palette: the Okabe–Ito colours, chosen to stay apart under the common
// colour-vision deficiencies. Every element also differs in stroke width,
// dash pattern or hatching, so the plots read in greyscale too.
const (
	inkBlack      = "#000000"
	inkOrange     = "#E69F00"
	inkSkyBlue    = "#56B4E9"
	inkGreen      = "#009E73" // bluish green
	inkBlue       = "#0072B2"
	inkVermillion = "#D55E00"
	inkPurple     = "#CC79A7" // reddish purple
	inkGrid       = "#D9D9D9"
	inkAxis       = "#555555"
	inkText       = "#222222"
)

// fontStack is the system font stack used in every SVG; no font is embedded
// or fetched.
const fontStack = `system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, "Liberation Sans", "DejaVu Sans", sans-serif`

// svgDoc accumulates one SVG element as text. Coordinates are printed with
// one decimal, which keeps long plots small and output deterministic.
type svgDoc struct {
	b strings.Builder
	// id prefixes every element id, so several plots can live in one page.
	id string
}

func (s *svgDoc) printf(format string, args ...any) { fmt.Fprintf(&s.b, format, args...) }

// open writes the root element. standalone adds the XML declaration.
func (s *svgDoc) open(width, height float64, title, desc string, standalone bool) {
	if standalone {
		s.b.WriteString(`<?xml version="1.0" encoding="UTF-8"?>` + "\n")
	}
	s.printf(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 %s %s" width="%s" height="%s" role="img" aria-labelledby="%stitle %sdesc" font-family="%s" font-size="12" fill="%s">`,
		num(width), num(height), num(width), num(height), s.id, s.id, escapeXML(fontStack), inkText)
	s.printf(`<title id="%stitle">%s</title><desc id="%sdesc">%s</desc>`, s.id, escapeXML(title), s.id, escapeXML(desc))
	s.b.WriteString("\n")
}

func (s *svgDoc) close() string {
	s.b.WriteString("</svg>\n")
	return s.b.String()
}

// hatch defines a diagonal-line pattern named s.id+name on a transparent
// background, so what lies below stays visible.
func (s *svgDoc) hatch(name, colour string, spacing float64) {
	s.printf(`<defs><pattern id="%s%s" patternUnits="userSpaceOnUse" width="%s" height="%s" patternTransform="rotate(45)"><line x1="0" y1="0" x2="0" y2="%s" stroke="%s" stroke-width="1.5"/></pattern></defs>`+"\n",
		s.id, name, num(spacing), num(spacing), num(spacing), colour)
}

func (s *svgDoc) line(x1, y1, x2, y2 float64, stroke string, width float64, dash string) {
	s.printf(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="%s"%s/>`+"\n",
		num(x1), num(y1), num(x2), num(y2), stroke, num(width), dashAttr(dash))
}

func (s *svgDoc) rect(x, y, w, h float64, attrs string) {
	s.printf(`<rect x="%s" y="%s" width="%s" height="%s" %s/>`+"\n", num(x), num(y), num(w), num(h), attrs)
}

// text writes a label; anchor is start, middle or end.
func (s *svgDoc) text(x, y float64, anchor, attrs, content string) {
	s.printf(`<text x="%s" y="%s" text-anchor="%s"%s>%s</text>`+"\n", num(x), num(y), anchor, attrs, escapeXML(content))
}

func dashAttr(dash string) string {
	if dash == "" {
		return ""
	}
	return ` stroke-dasharray="` + dash + `"`
}

// num prints a coordinate with one decimal, dropping a trailing ".0".
func num(v float64) string {
	s := strconv.FormatFloat(v, 'f', 1, 64)
	s = strings.TrimSuffix(s, ".0")
	if s == "-0" {
		s = "0"
	}
	return s
}

var xmlEscaper = strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&quot;", "'", "&#39;")

// escapeXML escapes text for XML character data and attribute values. It
// also drops the control characters XML 1.0 forbids, so a strange file name
// cannot make an SVG unparsable.
func escapeXML(s string) string {
	s = strings.Map(func(r rune) rune {
		if r < 0x20 && r != '\t' && r != '\n' && r != '\r' || r == 0xFFFE || r == 0xFFFF {
			return -1
		}
		return r
	}, s)
	return xmlEscaper.Replace(s)
}

// scale maps a value range linearly onto a pixel range.
type scale struct{ v0, v1, p0, p1 float64 }

func (c scale) at(v float64) float64 {
	if v < min(c.v0, c.v1) {
		v = min(c.v0, c.v1)
	}
	if v > max(c.v0, c.v1) {
		v = max(c.v0, c.v1)
	}
	return c.p0 + (v-c.v0)/(c.v1-c.v0)*(c.p1-c.p0)
}
