package lang

import (
	"fmt"
	"sort"
	"strings"
	"unicode/utf8"
)

// editDistance is the Levenshtein distance between a and b, in runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// closest returns the candidate nearest to name by edit distance, if it is
// near enough to be a likely misspelling; ties go to the first in sorted order.
func closest(name string, candidates []string) string {
	best, bestD := "", 1<<30
	limit := 1 + utf8.RuneCountInString(name)/3
	if limit > 3 {
		limit = 3
	}
	sorted := append([]string(nil), candidates...)
	sort.Strings(sorted)
	for _, c := range sorted {
		if c == name {
			continue
		}
		d := editDistance(strings.ToLower(name), strings.ToLower(c))
		if d < bestD {
			best, bestD = c, d
		}
	}
	if bestD <= limit {
		return best
	}
	return ""
}

// DidYouMean returns "; did you mean 'x'?" or "".
func DidYouMean(name string, candidates []string) string {
	if c := closest(name, candidates); c != "" {
		return fmt.Sprintf("; did you mean '%s'?", c)
	}
	return ""
}
