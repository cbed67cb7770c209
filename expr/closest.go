package expr

import (
	"math"
	"strings"
	"unicode/utf8"
)

// Closest returns the candidate nearest to name by edit distance
// (Levenshtein, case-insensitive), or "" when none is within
// max(2, len(name)/3) edits, len counted in characters. Among equally near
// candidates it prefers the one whose differing letters are neighbours on a
// keyboard (a likely typo: "pq" suggests "pw" before "pf"), then the first in
// the order given.
func Closest(name string, candidates []string) string {
	limit := max(2, utf8.RuneCountInString(name)/3)
	lname := []rune(strings.ToLower(name))
	best, bestDist, bestSlip := "", limit+1, math.Inf(1)
	for _, c := range candidates {
		lc := []rune(strings.ToLower(c))
		d := levenshtein(lname, lc)
		if d > limit || d > bestDist {
			continue
		}
		slip := keySlip(lname, lc)
		if d < bestDist || slip < bestSlip {
			best, bestDist, bestSlip = c, d, slip
		}
	}
	return best
}

func levenshtein(a, b []rune) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

var keyRows = []struct {
	keys   string
	offset float64
}{
	{"1234567890", 0}, {"qwertyuiop", 0.5}, {"asdfghjkl", 0.75}, {"zxcvbnm", 1.25},
}

// keySlip sums, for two words of equal length, the keyboard distance
// between the letters that differ; it is +Inf for words of unequal length.
func keySlip(a, b []rune) float64 {
	if len(a) != len(b) {
		return math.Inf(1)
	}
	sum := 0.0
	for i := range a {
		if a[i] != b[i] {
			sum += keyDistance(a[i], b[i])
		}
	}
	return sum
}

func keyDistance(a, b rune) float64 {
	ax, ay, aok := keyPos(a)
	bx, by, bok := keyPos(b)
	if !aok || !bok {
		return 10
	}
	return math.Hypot(ax-bx, ay-by)
}

func keyPos(r rune) (x, y float64, ok bool) {
	for row, kr := range keyRows {
		if i := strings.IndexRune(kr.keys, r); i >= 0 {
			return float64(i) + kr.offset, float64(row), true
		}
	}
	return 0, 0, false
}
