package pipeline

import (
	"bytes"
	"fmt"
	"io"
	"os"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/extent"
)

// Estimate returns the memory in bytes a run of o is expected to need
// (runMemory, the figure the run itself checks), before anything
// runs: it reads the first model's grid and counts the lines of the
// occurrence file (every record, before placing and thinning, so at least
// the run's count). A batch uses it to run several studies within a
// memory budget. Errors are input errors naming the file.
func Estimate(o Options) (int64, error) {
	if len(o.Models) == 0 {
		return 0, fault.BadInput(fmt.Errorf("no model raster given (--model NAME=PATH)"))
	}
	name, path, err := inputs.ParseNamedPath(o.Models[0])
	if err != nil {
		return 0, fault.BadInput(fmt.Errorf("--model %q: %w", o.Models[0], err))
	}
	if err := mustExist("model "+name, path); err != nil {
		return 0, err
	}
	g, err := extent.OpenGrid(path)
	if err != nil {
		return 0, fault.BadInput(fmt.Errorf("model %s: %w", name, err))
	}
	defer g.Close()
	points, err := countLines(o.Occurrences)
	if err != nil {
		return 0, err
	}
	est, _, _ := o.runMemory(int64(g.Cells()), int64(g.Height), points)
	return est.Total(), nil
}

// countLines counts the lines of the file at path (a last line without a
// newline counts).
func countLines(path string) (int, error) {
	if err := mustExist("occurrences", path); err != nil {
		return 0, err
	}
	f, err := os.Open(path)
	if err != nil {
		return 0, fault.BadInput(fmt.Errorf("occurrences: %s cannot be read: %v", path, err))
	}
	defer f.Close()
	buf := make([]byte, 64<<10)
	n, last := 0, byte('\n')
	for {
		k, err := f.Read(buf)
		n += bytes.Count(buf[:k], []byte{'\n'})
		if k > 0 {
			last = buf[k-1]
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			return 0, fault.BadInput(fmt.Errorf("occurrences: %s cannot be read: %v", path, err))
		}
	}
	if last != '\n' {
		n++
	}
	return n, nil
}

// MemoryBudget is the memory runs may plan to use together on this
// machine: memoryShare of the available memory (MemAvailable, or a
// cgroup limit when smaller), or 0 when unknown.
func MemoryBudget() int64 {
	return int64(memoryShare * float64(availableMemory()))
}
