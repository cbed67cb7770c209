// Package templates holds the HTML writer's templates and stylesheet,
// embedded in the binary. An organization may keep its own copies of these
// files, with the same names, in a folder passed to the writer
// (render.HTMLOptions.TemplateDir, the command's --template DIR); any file
// it leaves out is taken from here.
package templates

import "embed"

// Names lists the template files in the order they are parsed.
var Names = []string{"page.html", "nodes.html", "chart.html", "style.css"}

// FS holds the embedded templates: page.html (the document and its memo
// heading), nodes.html (one template per kind of block), chart.html (the
// inline SVG charts) and style.css (screen and print styles).
//
//go:embed page.html nodes.html chart.html style.css
var FS embed.FS
