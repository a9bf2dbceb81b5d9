package report

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"areasweep/report/outfile"
)

// referenceEncode is Encode as it was: encoding/json's encoder indenting.
func referenceEncode(t testing.TB, v any) []byte {
	t.Helper()
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// firstDiff describes where a and b first differ.
func firstDiff(a, b []byte) string {
	n := min(len(a), len(b))
	i := 0
	for i < n && a[i] == b[i] {
		i++
	}
	lo := max(0, i-40)
	return "at byte " + strconv.Itoa(i) + ": got ..." + string(a[lo:min(len(a), i+40)]) + "... want ..." + string(b[lo:min(len(b), i+40)]) + "..."
}

// TestEncodeSameAsEncodingJSON: Encode writes the bytes of encoding/json's
// indenting encoder, on the sample results, on them with awkward strings
// and extreme numbers put in, and on a results.json named by
// AREASWEEP_BENCH_RESULTS (a real study's) when set.
func TestEncodeSameAsEncodingJSON(t *testing.T) {
	paths := []string{filepath.Join(sampleDir, "sample_results.json")}
	if p := os.Getenv("AREASWEEP_BENCH_RESULTS"); p != "" {
		paths = append(paths, p)
	}
	for _, p := range paths {
		r, err := Load(p)
		if err != nil {
			t.Fatal(err)
		}
		check := func(what string) {
			t.Helper()
			got, err := r.Encode()
			if err != nil {
				t.Fatal(err)
			}
			if want := referenceEncode(t, r); !bytes.Equal(got, want) {
				t.Fatalf("%s (%s): Encode differs from encoding/json %s", p, what, firstDiff(got, want))
			}
		}
		check("as loaded")
		if err := Analyze(r); err != nil {
			t.Fatal(err)
		}
		check("analysed")
		// Strings with quotes, backslashes, JSON punctuation, HTML
		// characters, control characters and non-ASCII; empty and nil
		// slices; numbers at the edges of the float formats.
		r.Warnings = append(r.Warnings, `a "quoted" {x: [1, 2]}, \ back\\slash\"`, "<b>&amp;</b> \u2028\u2029 \x00\x1f\t\n é ∑ \xff", "", `\`, `"`)
		r.Settings.EcoregionField = `}],"{[:`
		r.Settings.Extra = []string{}
		r.Settings.FixedThresholds = nil
		r.Settings.E = []float64{0, math.Copysign(0, -1), 1e-7, 1e-6, 1e20, 1e21, -1e21, 123456789012345678, math.MaxFloat64, math.SmallestNonzeroFloat64, 0.1, 1.0 / 3}
		if len(r.Scores) > 0 {
			r.Scores[0].Placements = []float64{}
			r.Scores[0].TestPointIDs = nil
			r.Scores[0].Thresholds = []Threshold{}
			r.Scores[0].Boyce = nil
		}
		check("edited")
		// Top-level slices nil and empty, the omitempty fields absent.
		r.Warnings, r.Paired, r.Curves, r.Rings = nil, []Paired{}, nil, []Ring{}
		r.Preview, r.Sensitivity = nil, nil
		check("nil and empty")
	}
}

// TestIndentJSONSameAsIndent compares indentJSON with json.Indent on
// random nested values.
func TestIndentJSONSameAsIndent(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	strs := []string{"", "a", `"`, `\`, `\"`, `{`, `}`, `[`, `]`, `,`, `:`, "<>&", "\u00e9\u2028", "x y", `\\"\\`}
	var gen func(depth int) any
	gen = func(depth int) any {
		k := rng.IntN(9)
		if depth > 5 {
			k = rng.IntN(5)
		}
		switch k {
		case 0:
			return nil
		case 1:
			return rng.IntN(2) == 0
		case 2:
			return rng.NormFloat64() * math.Pow(10, float64(rng.IntN(50)-25))
		case 3:
			return rng.Int64() - rng.Int64()
		case 4:
			return strs[rng.IntN(len(strs))] + strs[rng.IntN(len(strs))]
		case 5, 6:
			n := rng.IntN(4)
			a := make([]any, n)
			for i := range a {
				a[i] = gen(depth + 1)
			}
			return a
		default:
			n := rng.IntN(4)
			m := map[string]any{}
			for range n {
				m[strs[rng.IntN(len(strs))]+strconv.Itoa(rng.IntN(3))] = gen(depth + 1)
			}
			return m
		}
	}
	for range 3000 {
		v := gen(0)
		src, err := json.Marshal(v)
		if err != nil {
			t.Fatal(err)
		}
		src = append(src, '\n')
		var want bytes.Buffer
		if err := json.Indent(&want, src, "", "  "); err != nil {
			t.Fatal(err)
		}
		if got := indentJSON(nil, src); !bytes.Equal(got, want.Bytes()) {
			t.Fatalf("indentJSON(%s) %s", src, firstDiff(got, want.Bytes()))
		}
	}
	// Deeper than the precomputed indentation.
	deep := bytes.Repeat([]byte("["), 40)
	deep = append(append(deep, '1'), bytes.Repeat([]byte("]"), 40)...)
	var want bytes.Buffer
	if err := json.Indent(&want, deep, "", "  "); err != nil {
		t.Fatal(err)
	}
	if got := indentJSON(nil, deep); !bytes.Equal(got, want.Bytes()) {
		t.Fatalf("deep nesting: %s", firstDiff(got, want.Bytes()))
	}
}

// TestIndenterPieces: a document indented in pieces cut between any two
// tokens comes out as indentJSON of the whole.
func TestIndenterPieces(t *testing.T) {
	src := []byte(`{"a":[1,{"b":"x,]}"},[],{}],"c":{},"d":[[["\\",null,true]]],"e":-1.5e-7}` + "\n")
	want := indentJSON(nil, src)
	// Token boundaries: before each delimiter and after it, outside strings.
	var cuts []int
	inStr := false
	for i := 0; i < len(src); i++ {
		switch c := src[i]; {
		case inStr && c == '\\':
			i++
		case c == '"':
			if !inStr {
				cuts = append(cuts, i)
			} else {
				cuts = append(cuts, i+1)
			}
			inStr = !inStr
		case !inStr && jsonDelim[c]:
			cuts = append(cuts, i, i+1)
		}
	}
	rng := rand.New(rand.NewPCG(3, 4))
	for range 500 {
		var in indenter
		var got []byte
		prev := 0
		for _, c := range cuts {
			if c > prev && rng.IntN(3) == 0 {
				got = in.indent(got, src[prev:c])
				prev = c
			}
		}
		got = in.indent(got, src[prev:])
		if !bytes.Equal(got, want) {
			t.Fatalf("in pieces: %s", firstDiff(got, want))
		}
	}
}

// TestResultsFieldsPlain: every field of Results is one EncodeTo encodes
// piecewise (else it would fall back to encoding the whole at once), and
// the big slices are encoded element by element.
func TestResultsFieldsPlain(t *testing.T) {
	fs := resultsFields()
	if fs == nil {
		t.Fatal("resultsFields is nil: Results has a field EncodeTo does not encode piecewise")
	}
	keys := map[string]resultsField{}
	for _, f := range fs {
		keys[string(f.key)] = f
	}
	for _, k := range []string{`"scores":`, `"curves":`, `"paired":`, `"points":`} {
		if f, ok := keys[k]; !ok || !f.elements {
			t.Errorf("field %s: present %v, element by element %v", k, ok, f.elements)
		}
	}
	if f := keys[`"preview":`]; !f.omitEmpty || f.elements {
		t.Errorf("preview: omitempty %v, elements %v; want true, false", f.omitEmpty, f.elements)
	}
}

// TestEncodeToChunks: a large results file is written in several writes,
// each about encodeChunk, whose concatenation is Encode's bytes.
func TestEncodeToChunks(t *testing.T) {
	r, err := Load(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	for len(r.Scores) < 2000 {
		r.Scores = append(r.Scores, r.Scores...)
	}
	var w countingWriter
	if err := r.EncodeTo(&w); err != nil {
		t.Fatal(err)
	}
	if want := referenceEncode(t, r); !bytes.Equal(w.buf.Bytes(), want) {
		t.Fatalf("EncodeTo %s", firstDiff(w.buf.Bytes(), want))
	}
	if n := w.buf.Len(); w.writes < n/(2*encodeChunk) || w.writes > n/encodeChunk+1 {
		t.Errorf("%d bytes in %d writes, want about %d", n, w.writes, n/encodeChunk)
	}
}

type countingWriter struct {
	buf    bytes.Buffer
	writes int
}

func (w *countingWriter) Write(p []byte) (int, error) {
	w.writes++
	return w.buf.Write(p)
}

// TestEncodeToError: a value encoding/json refuses (NaN) makes EncodeTo
// fail with encoding/json's reason, as Encode did, and a results.json
// written through outfile.WriteFrom is then not left behind.
func TestEncodeToError(t *testing.T) {
	r, err := Load(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	r.Scores[len(r.Scores)-1].AreaKm2 = math.NaN()
	if _, err := r.Encode(); err == nil || !strings.Contains(err.Error(), "unsupported value: NaN") {
		t.Errorf("Encode with a NaN: %v, want encoding/json's unsupported value", err)
	}
	path := filepath.Join(t.TempDir(), "results.json")
	if err := outfile.WriteFrom(path, 0o666, r.EncodeTo); err == nil {
		t.Error("WriteFrom of results with a NaN succeeded")
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("results.json left after a failed encoding: %v", err)
	}
}
