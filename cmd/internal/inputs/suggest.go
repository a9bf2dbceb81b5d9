package inputs

import "strings"

// Suggestions for a mistyped study key (the decoding is in study.go).

// closestKey suggests the allowed key nearest to k, or "": first ignoring
// case and reading '_' as '-', then, for keys of 4 or more characters, by
// edit distance of at most a third of the key's length.
func closestKey(k string) string {
	norm := strings.ToLower(strings.ReplaceAll(k, "_", "-"))
	for _, s := range studyKeys {
		if s == norm {
			return s
		}
	}
	if len(norm) < 4 {
		return ""
	}
	best, bestD := "", max(1, len(norm)/3)+1
	for _, s := range studyKeys {
		if d := editDistance(norm, s); d < bestD {
			best, bestD = s, d
		}
	}
	return best
}

// editDistance is the Levenshtein distance between a and b (bytes).
func editDistance(a, b string) int {
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
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
