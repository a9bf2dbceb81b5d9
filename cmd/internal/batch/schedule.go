package batch

import (
	"context"
	"errors"
	"fmt"
	"strconv"
	"strings"
	"sync"
)

// ErrTooLarge marks a study whose memory need alone exceeds the budget.
var ErrTooLarge = errors.New("batch: study needs more memory than the budget")

// Job is one study to run: its id and its memory need in bytes.
type Job struct {
	ID   string
	Need int64
}

// Limits bound what runs at once.
type Limits struct {
	// Jobs is the most studies running at once (at least 1).
	Jobs int
	// Budget is the most memory, in bytes, the running studies may need
	// together (more than 0).
	Budget int64
}

// Run runs run(ctx, i) for every job i within lim (see the package
// comment) and returns each job's error in job order (nil: it
// succeeded). A job refused for its size gets an error wrapping
// ErrTooLarge; once ctx is done no job starts, and those not started get
// ctx's error. Run returns when every started job has returned.
func Run(ctx context.Context, jobs []Job, lim Limits, run func(ctx context.Context, i int) error) []error {
	errs := make([]error, len(jobs))
	if lim.Jobs < 1 {
		lim.Jobs = 1
	}
	var pending []int
	for i, j := range jobs {
		if j.Need > lim.Budget {
			errs[i] = fmt.Errorf("%w: study %s needs about %s, the budget is %s", ErrTooLarge, j.ID, Bytes(j.Need), Bytes(lim.Budget))
			continue
		}
		pending = append(pending, i)
	}
	var (
		mu      sync.Mutex
		wake    = sync.NewCond(&mu)
		running int
		used    int64
		wg      sync.WaitGroup
	)
	// A cancelled context wakes the loop below.
	stop := context.AfterFunc(ctx, func() {
		mu.Lock()
		wake.Broadcast()
		mu.Unlock()
	})
	defer stop()
	mu.Lock()
	for len(pending) > 0 && ctx.Err() == nil {
		k := -1
		if running < lim.Jobs {
			for n, i := range pending {
				if used+jobs[i].Need <= lim.Budget {
					k = n
					break
				}
			}
		}
		if k < 0 {
			wake.Wait()
			continue
		}
		i := pending[k]
		pending = append(pending[:k], pending[k+1:]...)
		running++
		used += jobs[i].Need
		wg.Add(1)
		go func() {
			defer wg.Done()
			err := runOne(ctx, i, run)
			mu.Lock()
			errs[i] = err
			running--
			used -= jobs[i].Need
			wake.Broadcast()
			mu.Unlock()
		}()
	}
	for _, i := range pending {
		errs[i] = ctx.Err()
	}
	mu.Unlock()
	wg.Wait()
	return errs
}

// runOne runs job i, turning a panic into an error so that one study's
// crash does not end the others.
func runOne(ctx context.Context, i int, run func(context.Context, int) error) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = &PanicError{Value: r}
		}
	}()
	return run(ctx, i)
}

// PanicError is a study that panicked: a bug, reported as that study's
// failure.
type PanicError struct{ Value any }

func (e *PanicError) Error() string {
	return fmt.Sprintf("internal error (a bug in areasweep, please report it): %v", e.Value)
}

// Bytes formats a byte count in MiB or GiB.
func Bytes(b int64) string {
	if b >= 1<<30 {
		return fmt.Sprintf("%.1f GiB", float64(b)/(1<<30))
	}
	return fmt.Sprintf("%.0f MiB", float64(b)/(1<<20))
}

// ParseBytes reads a size such as 512M, 8G, 1.5GiB or a plain byte count
// (binary units: 1K = 1024), as the batch's --memory takes it.
func ParseBytes(s string) (int64, error) {
	t := strings.ToUpper(strings.TrimSpace(s))
	t = strings.TrimSuffix(strings.TrimSuffix(t, "IB"), "B")
	mult := int64(1)
	for _, u := range []struct {
		suffix string
		m      int64
	}{{"K", 1 << 10}, {"M", 1 << 20}, {"G", 1 << 30}, {"T", 1 << 40}} {
		if strings.HasSuffix(t, u.suffix) {
			t, mult = strings.TrimSuffix(t, u.suffix), u.m
			break
		}
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
	if err != nil || !(v > 0) || v*float64(mult) > 1<<62 {
		return 0, errors.New("give a positive size such as 512M, 8G or 16GiB")
	}
	return int64(v * float64(mult)), nil
}
