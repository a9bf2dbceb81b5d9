package inputs

import "strings"

// Suggestions for a mistyped name: a study key (the decoding is in
// study.go) or a command-line flag (cmd/areasweep).

// closestKey suggests the allowed study key nearest to k, or "" (Closest).
func closestKey(k string) string { return Closest(k, studyKeys) }

// Closest suggests the name of names nearest to k, or "": first ignoring
// case and reading '_' as '-'; then, for names of 4 or more characters,
// by edit distance of at most a third of the name's length (the first of
// the nearest, in the order of names); then the one name that begins with
// k when k has 3 or more characters and only one does (--iter for
// --iterations). The cut-offs are our choice: close enough that the
// suggestion is most likely what was meant.
func Closest(k string, names []string) string {
	norm := strings.ToLower(strings.ReplaceAll(k, "_", "-"))
	for _, s := range names {
		if s == norm {
			return s
		}
	}
	if len(norm) < 3 {
		return ""
	}
	if len(norm) >= 4 {
		best, bestD := "", max(1, len(norm)/3)+1
		for _, s := range names {
			if d := editDistance(norm, s); d < bestD {
				best, bestD = s, d
			}
		}
		if best != "" {
			return best
		}
	}
	prefixed := ""
	for _, s := range names {
		if strings.HasPrefix(s, norm) {
			if prefixed != "" {
				return ""
			}
			prefixed = s
		}
	}
	return prefixed
}

// editDistance is the optimal string alignment distance between a and b
// (bytes): the Levenshtein distance (insertions, deletions,
// substitutions) with a swap of two adjacent bytes counted as one edit,
// so that "modle" is one edit from "model".
func editDistance(a, b string) int {
	pp := make([]int, len(b)+1) // row i-2
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			c := prev[j-1]
			if a[i-1] != b[j-1] {
				c++
			}
			c = min(c, prev[j]+1, cur[j-1]+1)
			if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] {
				c = min(c, pp[j-2]+1)
			}
			cur[j] = c
		}
		pp, prev, cur = prev, cur, pp
	}
	return prev[len(b)]
}
