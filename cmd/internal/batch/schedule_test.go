package batch

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// TestRunLimits runs random jobs with a fake study that records how many
// jobs and how much memory run at once: never more than the limits, every
// job that fits runs exactly once, a job above the budget is refused, and
// errors come back in job order.
func TestRunLimits(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, c := range []struct {
		name   string
		jobs   int
		budget int64
		n      int
	}{{"one at a time", 1, 100, 12}, {"two jobs", 2, 100, 20}, {"memory binds", 8, 100, 30}, {"many", 4, 1000, 40}} {
		t.Run(c.name, func(t *testing.T) {
			jobs := make([]Job, c.n)
			for i := range jobs {
				jobs[i] = Job{ID: fmt.Sprintf("s%02d", i), Need: 1 + rng.Int64N(c.budget*6/10)}
			}
			jobs[c.n/2].Need = c.budget + 1 // alone above the budget
			var mu sync.Mutex
			var running, peakJobs int
			var used, peakMem int64
			calls := make([]int32, c.n)
			errs := Run(context.Background(), jobs, Limits{Jobs: c.jobs, Budget: c.budget}, func(ctx context.Context, i int) error {
				atomic.AddInt32(&calls[i], 1)
				mu.Lock()
				running++
				used += jobs[i].Need
				peakJobs, peakMem = max(peakJobs, running), max(peakMem, used)
				mu.Unlock()
				time.Sleep(time.Duration(1+i%3) * time.Millisecond)
				mu.Lock()
				running--
				used -= jobs[i].Need
				mu.Unlock()
				if i%7 == 3 {
					return fmt.Errorf("study %s failed", jobs[i].ID)
				}
				return nil
			})
			if peakJobs > c.jobs || peakMem > c.budget {
				t.Errorf("peak %d jobs and %d bytes, limits %d and %d", peakJobs, peakMem, c.jobs, c.budget)
			}
			for i, err := range errs {
				switch {
				case i == c.n/2:
					if !errors.Is(err, ErrTooLarge) || calls[i] != 0 {
						t.Errorf("job %d above the budget: err %v, %d calls", i, err, calls[i])
					}
				case i%7 == 3:
					if err == nil || err.Error() != fmt.Sprintf("study %s failed", jobs[i].ID) || calls[i] != 1 {
						t.Errorf("job %d: err %v, %d calls", i, err, calls[i])
					}
				default:
					if err != nil || calls[i] != 1 {
						t.Errorf("job %d: err %v, %d calls", i, err, calls[i])
					}
				}
			}
		})
	}
}

// TestRunConcurrent checks that two jobs that fit do run at the same time
// (each waits for the other to start).
func TestRunConcurrent(t *testing.T) {
	started := make(chan int, 2)
	release := make(chan struct{})
	done := make(chan []error)
	go func() {
		done <- Run(context.Background(), []Job{{"a", 10}, {"b", 10}}, Limits{Jobs: 2, Budget: 20}, func(ctx context.Context, i int) error {
			started <- i
			<-release
			return nil
		})
	}()
	for range 2 {
		select {
		case <-started:
		case <-time.After(10 * time.Second):
			t.Fatal("the second job did not start while the first ran")
		}
	}
	close(release)
	for _, err := range <-done {
		if err != nil {
			t.Error(err)
		}
	}
}

// TestRunCancel checks that a cancelled context starts nothing more, that
// jobs not started report the context's error, and a panic is one job's
// error.
func TestRunCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	jobs := []Job{{"a", 1}, {"b", 1}, {"c", 1}}
	errs := Run(ctx, jobs, Limits{Jobs: 1, Budget: 10}, func(ctx context.Context, i int) error {
		if i == 0 {
			cancel()
			panic("boom")
		}
		return nil
	})
	var pe *PanicError
	if !errors.As(errs[0], &pe) {
		t.Errorf("job 0: %v, want a PanicError", errs[0])
	}
	for i := 1; i < 3; i++ {
		if !errors.Is(errs[i], context.Canceled) {
			t.Errorf("job %d: %v, want context.Canceled", i, errs[i])
		}
	}
}

// TestMarker writes a marker, reads it back, and checks that no temporary
// file is left and a missing marker reads as nil.
func TestMarker(t *testing.T) {
	dir := t.TempDir()
	if m, err := ReadMarker(dir); m != nil || err != nil {
		t.Fatalf("no marker: %v %v", m, err)
	}
	want := Marker{"study": "oak", "settings": SettingsHash([]byte("x")), "results": "abc"}
	if err := WriteMarker(dir, want); err != nil {
		t.Fatal(err)
	}
	got, err := ReadMarker(dir)
	if err != nil || len(got) != 3 || got["study"] != "oak" || got["settings"] != want["settings"] {
		t.Errorf("read back %v (%v)", got, err)
	}
	// SHA-256 of "x" from coreutils: printf x | sha256sum.
	if want["settings"] != "2d711642b726b04401627ca9fbac32f5c8530fb1903cc4db02258717921a4881" {
		t.Errorf("SettingsHash(x) = %s", want["settings"])
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("folder holds %d entries, want the marker only", len(ents))
	}
	if err := WriteMarker(dir, Marker{"bad\tkey": "v"}); err == nil {
		t.Error("a key with a tab was accepted")
	}
}

// TestParseBytes checks the --memory sizes (binary units: 1K = 1024).
func TestParseBytes(t *testing.T) {
	for _, c := range []struct {
		in   string
		want int64
	}{{"512M", 512 << 20}, {"8G", 8 << 30}, {"8g", 8 << 30}, {"1.5GiB", 3 << 29}, {"2048", 2048}, {"64KB", 64 << 10}, {"1T", 1 << 40}} {
		if got, err := ParseBytes(c.in); err != nil || got != c.want {
			t.Errorf("%q: %d %v, want %d", c.in, got, err, c.want)
		}
	}
	for _, bad := range []string{"", "0", "-1G", "G", "lots", "1e30G"} {
		if _, err := ParseBytes(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}
