// Package scaffold holds the starter memos that "worth new" writes: a
// small built-in set in scenarios of our own, each of which builds as is
// and shows the memo language's main forms.
package scaffold

import (
	"embed"
	"fmt"
	"strings"
)

//go:embed starters/*.md
var starters embed.FS

// Kind is one starter memo.
type Kind struct {
	Name    string
	Summary string
}

// Kinds lists the starters, the default first.
var Kinds = []Kind{
	{"study-period", "alternatives with different lives compared over a fixed span of years (a lease, a site to be sold)"},
	{"forever", "a service provided forever by alternatives with different lives (capitalized cost, perpetual horizon)"},
	{"revenue", "projects that earn money, where doing nothing is an option (rates of return, benefit-cost, payback)"},
}

// Names returns the starters' names.
func Names() []string {
	out := make([]string, len(Kinds))
	for i, k := range Kinds {
		out[i] = k.Name
	}
	return out
}

// Memo returns the starter memo of a kind with its title and date filled
// in. The title is written as a YAML string, so any text is safe in it.
func Memo(kind, title, date string) ([]byte, error) {
	b, err := starters.ReadFile("starters/" + kind + ".md")
	if err != nil {
		return nil, fmt.Errorf("no starter memo of kind %q", kind)
	}
	s := string(b)
	s = strings.Replace(s, "title: TITLE", "title: "+yamlString(title), 1)
	s = strings.Replace(s, "date: DATE", "date: "+date, 1)
	return []byte(s), nil
}

// yamlString quotes s for a YAML value when it needs it.
func yamlString(s string) string {
	if s != "" && !strings.ContainsAny(s, ":#'\"{}[],&*!|>%@`\\") && strings.TrimSpace(s) == s {
		return s
	}
	return `"` + strings.NewReplacer(`\`, `\\`, `"`, `\"`).Replace(s) + `"`
}
