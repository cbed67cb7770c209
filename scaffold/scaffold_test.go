package scaffold

import (
	"strings"
	"testing"

	"worth/parse"
)

// TestMemoTitle: any title, however it is punctuated, reads back from the
// starter's front matter as written; the date is filled in.
func TestMemoTitle(t *testing.T) {
	for _, title := range []string{"Pump station", `Screens: steel or "wedge-wire"`, "# 2 intake", "50% more capacity", `C:\plans`, " padded "} {
		for _, k := range Names() {
			src, err := Memo(k, title, "2027-01-31")
			if err != nil {
				t.Fatal(err)
			}
			m, err := parse.Parse("new.md", src)
			if err != nil && !strings.Contains(err.Error(), "cash flows from") {
				t.Fatalf("%s, title %q: %v", k, title, err)
			}
			if got := m.Front.Title.Value.Src; got != strings.TrimSpace(title) {
				t.Errorf("%s: title %q reads back as %q", k, title, got)
			}
			if got := m.Front.Date.Value.Src; got != "2027-01-31" {
				t.Errorf("%s: date %q", k, got)
			}
		}
	}
	if _, err := Memo("nosuch", "x", "2027-01-31"); err == nil {
		t.Error("an unknown kind gave a memo")
	}
}
