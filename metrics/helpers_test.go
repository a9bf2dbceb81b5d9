package metrics

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"slices"
	"strconv"
	"testing"
)

// testCase is one background plus presences, as stored in cases.csv.
type testCase struct {
	bgV   []float64
	bgW   []int64
	test  []float64
	train []float64
}

// build makes a layout and accumulator for c.
func build(t testing.TB, c testCase, fixed []float64, histBins int) (*Layout, *Accumulator) {
	t.Helper()
	vals := append(append(slices.Clone(c.test), c.train...), fixed...)
	l, err := NewLayout(vals, histBins)
	if err != nil {
		t.Fatal(err)
	}
	a := l.NewAccumulator()
	for i, v := range c.bgV {
		a.Add(v, c.bgW[i])
	}
	return l, a
}

const goldenDir = "../testdata/metrics/"

// readGoldenCSV returns the rows of the CSV file name of goldenDir, its
// header first.
func readGoldenCSV(t testing.TB, name string) [][]string {
	t.Helper()
	f, err := os.Open(goldenDir + name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	if len(rows) == 0 {
		t.Fatalf("%s is empty", name)
	}
	return rows
}

func loadCases(t testing.TB) map[string]testCase {
	t.Helper()
	rows := readGoldenCSV(t, "cases.csv")
	out := map[string]testCase{}
	for _, r := range rows[1:] {
		v, err1 := strconv.ParseFloat(r[2], 64)
		w, err2 := strconv.ParseInt(r[3], 10, 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("bad row %v", r)
		}
		c := out[r[0]]
		switch r[1] {
		case "bg":
			c.bgV = append(c.bgV, v)
			c.bgW = append(c.bgW, w)
		case "test":
			c.test = append(c.test, v)
		case "train":
			c.train = append(c.train, v)
		default:
			t.Fatalf("bad role in %v", r)
		}
		out[r[0]] = c
	}
	if len(out) == 0 {
		t.Fatal("no cases in cases.csv")
	}
	return out
}

type goldenThreshold struct {
	Name         string  `json:"name"`
	Value        float64 `json:"value"`
	Omission     float64 `json:"omission"`
	AreaFraction float64 `json:"area_fraction"`
	Successes    int     `json:"successes"`
	N            int     `json:"n"`
	PBinomial    float64 `json:"p_binomial"`
}

type golden struct {
	AUC map[string]struct {
		AUC           float64 `json:"auc"`
		AUCUnweighted float64 `json:"auc_unweighted"`
		AUCTrain      float64 `json:"auc_train"`
	} `json:"auc"`
	Thresholds map[string][]goldenThreshold `json:"thresholds"`
	Binomial   []struct {
		N, K    int
		P, Tail float64
	} `json:"binomial"`
	Spearman []struct {
		Name string
		X, Y []float64
		Rho  float64
	} `json:"spearman"`
	Quantile []struct {
		Name       string
		V          []float64
		P025, P975 float64
	} `json:"quantile"`
}

func loadGolden(t testing.TB) golden {
	t.Helper()
	data, err := os.ReadFile(goldenDir + "sklearn_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g golden
	if err := json.Unmarshal(data, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.AUC) == 0 || len(g.Binomial) == 0 || len(g.Spearman) == 0 || len(g.Quantile) == 0 {
		t.Fatal("sklearn_golden.json is incomplete")
	}
	return g
}

// procRow is one line of proc_golden.csv.
type procRow struct {
	quantity string
	e        float64
	value    float64
}

func loadProc(t testing.TB) map[string][]procRow {
	t.Helper()
	rows := readGoldenCSV(t, "proc_golden.csv")
	out := map[string][]procRow{}
	for _, r := range rows[1:] {
		e, err1 := strconv.ParseFloat(r[2], 64)
		v, err2 := strconv.ParseFloat(r[3], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("bad row %v", r)
		}
		out[r[0]] = append(out[r[0]], procRow{r[1], e, v})
	}
	if len(out) == 0 {
		t.Fatal("no rows in proc_golden.csv")
	}
	return out
}

func near(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// quick returns settings with a small bootstrap for fast tests.
func quick(e ...float64) Settings {
	return Settings{E: e, Iterations: 50, Seed: 1}
}
