package scenario

import (
	"math/rand/v2"
	"strings"
)

// Species is the invented species of the demo scenario. The binomial was made
// up for this program; the species, its landscape and its records do not exist.
const Species = "Zeltharia vornimontis"

// Syllables and landform words from which invented unit names are built.
var (
	nameSyllables = []string{
		"ar", "bel", "cor", "dun", "el", "fen", "gar", "hol", "ist", "jor",
		"kel", "lun", "mar", "nes", "ov", "pel", "quen", "ros", "sel", "tor",
		"ul", "ven", "wyr", "yas", "zan", "brae", "thal", "vask", "orn", "imb",
	}
	nameLandforms = []string{
		"Uplands", "Lowlands", "Basin", "Plateau", "Coast", "Steppe", "Barrens",
		"Hills", "Fells", "Moors", "Plains", "Scarp", "Downs", "Mires",
	}
)

// unitNames returns n distinct invented names such as "Velmarist Downs":
// two or three random syllables, capitalised, and a landform word.
func unitNames(r *rand.Rand, n int) []string {
	seen := make(map[string]bool, n)
	out := make([]string, 0, n)
	for len(out) < n {
		var b strings.Builder
		for k := range 2 + r.IntN(2) {
			s := nameSyllables[r.IntN(len(nameSyllables))]
			if k == 0 {
				s = strings.ToUpper(s[:1]) + s[1:]
			}
			b.WriteString(s)
		}
		name := b.String() + " " + nameLandforms[r.IntN(len(nameLandforms))]
		if !seen[name] {
			seen[name] = true
			out = append(out, name)
		}
	}
	return out
}
