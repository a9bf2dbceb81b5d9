package report

import (
	"encoding/base64"
	"fmt"
	"math"
)

// The preview codec: NewPreview packs the coarse copy of the first model
// and the extents' masks into results.json (see Preview); decodePreview
// reads them back for the map figure.

// NewPreview packs a coarse copy of width x height cells (values row by
// row from the north, NaN for no data) and one mask per extent into a
// Preview. Each value becomes one byte,
//
//	round(clamp((v - lo) / (hi - lo), 0, 1) * 254),  255 for NaN,
//
// (0 for every value when hi <= lo), and each mask a bitset, bit i = cell
// i, least significant bit first. bounds are west, south, east, north in
// the grid's CRS.
func NewPreview(width, height int, bounds [4]float64, values []float64, lo, hi float64, masks [][]bool) *Preview {
	vals := make([]byte, len(values))
	for i, v := range values {
		switch {
		case math.IsNaN(v):
			vals[i] = 255
		case hi > lo:
			vals[i] = byte(math.Round(math.Max(0, math.Min(1, (v-lo)/(hi-lo))) * 254))
		}
	}
	p := &Preview{Width: width, Height: height, Bounds: bounds, ValueMin: lo, ValueMax: hi,
		Values: base64.StdEncoding.EncodeToString(vals)}
	for _, m := range masks {
		bits := make([]byte, (len(values)+7)/8)
		for i, in := range m {
			if in {
				bits[i/8] |= 1 << uint(i%8)
			}
		}
		p.Masks = append(p.Masks, base64.StdEncoding.EncodeToString(bits))
	}
	return p
}

// decodePreview decodes the preview values and masks.
func decodePreview(pv *Preview) (vals []byte, masks [][]bool, err error) {
	n := pv.Width * pv.Height
	if pv.Width <= 0 || pv.Height <= 0 {
		return nil, nil, fmt.Errorf("report: preview has size %dx%d", pv.Width, pv.Height)
	}
	vals, err = base64.StdEncoding.DecodeString(pv.Values)
	if err != nil {
		return nil, nil, fmt.Errorf("report: preview values: %w", err)
	}
	if len(vals) != n {
		return nil, nil, fmt.Errorf("report: preview values hold %d bytes, want %d", len(vals), n)
	}
	for k, m := range pv.Masks {
		bits, err := base64.StdEncoding.DecodeString(m)
		if err != nil {
			return nil, nil, fmt.Errorf("report: preview mask %d: %w", k, err)
		}
		if len(bits)*8 < n {
			return nil, nil, fmt.Errorf("report: preview mask %d holds %d bits, want %d", k, len(bits)*8, n)
		}
		mk := make([]bool, n)
		for i := range mk {
			mk[i] = bits[i/8]&(1<<(uint(i)%8)) != 0
		}
		masks = append(masks, mk)
	}
	return vals, masks, nil
}
