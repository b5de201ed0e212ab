package htmlpage

import (
	_ "embed"
	"html/template"
)

// The page's markup, style and script live beside this file and are copied
// into every report, so the report needs nothing else.
var (
	//go:embed page.tmpl
	pageMarkup string
	//go:embed page.css
	pageCSS string
	//go:embed sort.js
	sortScript string
)

var pageTemplate = template.Must(template.New("page").Parse(pageMarkup))
