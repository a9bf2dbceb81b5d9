package report

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"testing"
)

// edits are the bytes the tests put into a text.
const edits = "x}],:\"\\-0 e\x01"

// decoderTokens is a json.Decoder as CheckShape reads a file without
// fastTokens.
func decoderTokens(data []byte) *json.Decoder {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	return dec
}

// TestFastTokensAsDecoder: on valid and broken JSON, every token
// fastTokens gives, and every answer of its More, is the json.Decoder's
// at that place, until it stops with errNotFast (where the decoder may
// read on or fail) or both reach the end.
func TestFastTokensAsDecoder(t *testing.T) {
	texts := []string{
		`{}`, `[]`, ` {"a": [1, -2.5e+3, 0, -0, 1E5, true, false, null, "x"]} `,
		`{"k\u00e9y": "\u00e9t\u00e9", "esc": "a\"b\\c\/d\n\u0041", "utf8": "été", "bad": "` + "\xff" + `"}`,
		`{"a": 01}`, `{"a": 1.}`, `{"a": .5}`, `{"a": +1}`, `{"a": 1e}`, `{"a": -}`, `{"a": NaN}`,
		`{"a": 1 2}`, `{"a" 1}`, `{"a": 1,}`, `[1,]`, `[,1]`, `{,}`, `{"a": tru}`, `{"a": truex}`,
		`{"a": nul`, `{"a": "cut`, `{"a": [1, 2`, `{"a": 1}}`, `{"a": 1} {}`, `{"a": 1} x`, `1`, `"s"`,
		"{\"a\": \"tab\there\"}", `{"a": "\x"}`, `{"a": "\u12"}`, `{1: 2}`, `{"a": {"b": [{}, [], [[]]]}}`,
		"{\"a\":\t\r\n1}", `{"a": 1e400}`, `{"a": 123456789012345678901234567890}`, ``, `   `,
	}
	sample, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	texts = append(texts, string(sample))
	// Hand edits of the sample: cut short, a byte removed or put in.
	rng := rand.New(rand.NewPCG(1, 2))
	for range 300 {
		p := rng.IntN(len(sample))
		switch rng.IntN(3) {
		case 0:
			texts = append(texts, string(sample[:p]))
		case 1:
			texts = append(texts, string(sample[:p])+string(sample[p+1:]))
		default:
			texts = append(texts, string(sample[:p])+string(edits[rng.IntN(len(edits))])+string(sample[p:]))
		}
	}
	for i, text := range texts {
		fast, dec := newFastTokens([]byte(text)), decoderTokens([]byte(text))
		for n := 0; ; n++ {
			if fm, dm := fast.More(), dec.More(); fm != dm {
				t.Errorf("text %d, token %d: More %v, the decoder's %v", i, n, fm, dm)
				break
			}
			ft, ferr := fast.Token()
			if ferr == errNotFast {
				break
			}
			dt, derr := dec.Token()
			if !reflect.DeepEqual(ft, dt) || !errors.Is(ferr, derr) {
				t.Errorf("text %d, token %d: %#v (%v), the decoder's %#v (%v)", i, n, ft, ferr, dt, derr)
				break
			}
			if ferr == io.EOF {
				break
			}
		}
	}
}

// TestCheckShapeFastAsDecoder: CheckShape gives the message it gave
// reading every file with a json.Decoder, on the sample cut short and
// with bytes removed, put in or changed.
func TestCheckShapeFastAsDecoder(t *testing.T) {
	sample, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	texts := [][]byte{sample}
	for range 120 {
		p := rng.IntN(len(sample))
		var b []byte
		switch rng.IntN(4) {
		case 0:
			b = append(b, sample[:p]...)
		case 1:
			b = append(append(b, sample[:p]...), sample[p+1:]...)
		case 2:
			b = append(append(append(b, sample[:p]...), edits[rng.IntN(len(edits))]), sample[p:]...)
		default:
			b = append(b, sample...)
			b[p] = edits[rng.IntN(len(edits))]
		}
		texts = append(texts, b)
	}
	for i, b := range texts {
		got, want := CheckShape(b), checkShape(b, decoderTokens(b))
		if (got == nil) != (want == nil) || (got != nil && got.Error() != want.Error()) {
			t.Errorf("text %d: %v, with the decoder alone %v", i, got, want)
		}
	}
}
