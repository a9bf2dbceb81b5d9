package metrics_test

import (
	"fmt"
	"math/bits"

	"areasweep/metrics"
)

// Example scores a model on one extent of six cells, following the raster
// pass: Locate once per cell, then AddLocated into every extent whose bit is
// set in the cell's mask.
func Example() {
	train := []float64{0.6, 0.8, 0.9}
	test := []float64{0.5, 0.8, 0.9, 0.9}
	values := append(append([]float64{}, train...), test...)
	l, err := metrics.NewLayout(values, 16)
	if err != nil {
		fmt.Println(err)
		return
	}
	// Two nested extents: bit 0 = small, bit 1 = large.
	accs := []*metrics.Accumulator{l.NewAccumulator(), l.NewAccumulator()}
	cells := []struct {
		v    float64
		area int64
		mask uint64
	}{
		{0.1, 10, 0b10}, {0.3, 10, 0b10}, {0.5, 12, 0b11},
		{0.7, 12, 0b11}, {0.8, 11, 0b11}, {0.9, 11, 0b11},
	}
	for _, c := range cells {
		bin := l.Locate(c.v)
		for m := c.mask; m != 0; m &= m - 1 {
			accs[bits.TrailingZeros64(m)].AddLocated(bin, c.v, c.area)
		}
	}
	// The numbers check by hand: on extent 0 (area 46) the test presences
	// sum W(<v)+W(=v)/2 to 6+29.5+40.5+40.5 = 116.5, AUC = 116.5/(4*46);
	// the curve reaches y = 0.75 at x = 22/46.
	s := metrics.Settings{E: []float64{0.25}, Iterations: 100, Seed: 1}
	for i, a := range accs {
		sc, err := metrics.Score(a, train, test, s)
		if err != nil {
			fmt.Println(err)
			return
		}
		p := sc.PartialROC[0]
		fmt.Printf("extent %d: area %d AUC %.4f partial ROC ratio %.4f (x_E %.4f)\n", i, sc.Area, sc.AUC, p.Ratio, p.XE)
		for _, th := range sc.Thresholds {
			fmt.Printf("  %s %.2f: omission %.2f area %.4f p %.4f\n", th.Name, th.Value, th.Omission, th.AreaFraction, th.PBinomial)
		}
	}
	// Output:
	// extent 0: area 46 AUC 0.6332 partial ROC ratio 1.0993 (x_E 0.4783)
	//   minimum_training_presence 0.60: omission 0.25 area 0.7391 p 0.7198
	//   p10_training_presence 0.60: omission 0.25 area 0.7391 p 0.7198
	// extent 1: area 66 AUC 0.7443 partial ROC ratio 1.3466 (x_E 0.3333)
	//   minimum_training_presence 0.60: omission 0.25 area 0.5152 p 0.3356
	//   p10_training_presence 0.60: omission 0.25 area 0.5152 p 0.3356
}
