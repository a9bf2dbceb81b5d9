package scenario

import (
	"path/filepath"
	"strconv"
	"testing"
)

func BenchmarkNewScene300x240(b *testing.B) {
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		newScene(uint64(i))
	}
}

func BenchmarkWrite300x240(b *testing.B) {
	b.ReportAllocs()
	dir := b.TempDir()
	for i := 0; b.Loop(); i++ {
		if _, err := Write(filepath.Join(dir, strconv.Itoa(i)), uint64(i)); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkVoronoi40(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		makeUnits(3)
	}
}
