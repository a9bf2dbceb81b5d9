package slurm

import (
	"bytes"
	"context"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// Expected values are by construction (written by hand from the inputs).

func TestManifestRoundTrip(t *testing.T) {
	tasks := []Task{
		{"oak", 1, 2, "/scratch/b/oak/shard-1"},
		{"oak", 2, 2, "/scratch/b/oak/shard-2"},
		{"lynx pardinus", 1, 1, "/scratch/b/lynx pardinus"},
	}
	var b bytes.Buffer
	if err := WriteManifest(&b, tasks); err != nil {
		t.Fatal(err)
	}
	want := "study\tshard\tout\noak\t1/2\t/scratch/b/oak/shard-1\noak\t2/2\t/scratch/b/oak/shard-2\nlynx pardinus\t1/1\t/scratch/b/lynx pardinus\n"
	if b.String() != want {
		t.Fatalf("manifest:\n%s\nwant:\n%s", b.String(), want)
	}
	back, err := ReadManifest(&b, "m.tsv")
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(back, tasks) {
		t.Fatalf("round trip: %+v", back)
	}
}

func TestManifestRefuses(t *testing.T) {
	cases := map[string]struct{ text, words string }{
		"empty":         {"", "is empty"},
		"header":        {"id\tshard\tout\n", "line 1: header"},
		"fields":        {"study\tshard\tout\noak\t1/1\n", "m.tsv line 2: 2 fields"},
		"shard form":    {"study\tshard\tout\noak\t1of2\t/x\n", `line 2: shard "1of2"`},
		"shard range":   {"study\tshard\tout\noak\t3/2\t/x\n", "shard 3/2"},
		"shard zero":    {"study\tshard\tout\noak\t0/2\t/x\n", "shard 0/2"},
		"plus sign":     {"study\tshard\tout\noak\t+1/2\t/x\n", `shard "+1/2"`},
		"relative out":  {"study\tshard\tout\noak\t1/1\tout/oak\n", "not absolute"},
		"empty study":   {"study\tshard\tout\n\t1/1\t/x\n", "study id"},
		"line 3 is bad": {"study\tshard\tout\noak\t1/1\t/x\nfir\t1/1\n", "line 3"},
	}
	for name, c := range cases {
		_, err := ReadManifest(strings.NewReader(c.text), "m.tsv")
		if !errors.Is(err, ErrManifest) || !strings.Contains(err.Error(), c.words) {
			t.Errorf("%s: got %v, want ErrManifest with %q", name, err, c.words)
		}
	}
	if err := WriteManifest(&bytes.Buffer{}, []Task{{"a\tb", 1, 1, "/x"}}); !errors.Is(err, ErrManifest) {
		t.Errorf("tab in id: %v", err)
	}
}

func TestArraySpec(t *testing.T) {
	cases := []struct {
		ids  []int
		max  int
		want string
	}{
		{nil, 0, ""},
		{[]int{4}, 0, "4"},
		{[]int{1, 2, 3, 5, 7, 8}, 0, "1-3,5,7-8"},
		{[]int{1, 2, 3, 4}, 2, "1-4%2"},
		{[]int{2, 4, 6}, 0, "2,4,6"},
	}
	for _, c := range cases {
		if got := ArraySpec(c.ids, c.max); got != c.want {
			t.Errorf("ArraySpec(%v, %d) = %q, want %q", c.ids, c.max, got, c.want)
		}
	}
}

func TestMemoryMB(t *testing.T) {
	// estimate + estimate/4 + 256 MiB, rounded up to whole MiB.
	cases := map[int64]int{0: 256, -5: 256, 1: 257, 4 << 20: 261, 1 << 30: 1280 + 256}
	for in, want := range cases {
		if got := MemoryMB(in); got != want {
			t.Errorf("MemoryMB(%d) = %d, want %d", in, got, want)
		}
	}
}

func testPlan(dir string, n int, cmd string) *Plan {
	p := &Plan{Name: "t", Dir: dir, TaskCommand: cmd, MemoryMB: 100, CPUs: 1,
		MergeCommand: "true"}
	for i := range n {
		p.Tasks = append(p.Tasks, Task{Study: "s" + strconv.Itoa(i/2), Shard: i%2 + 1, Shards: 2,
			Out: filepath.Join(dir, "out", "s"+strconv.Itoa(i/2), "shard-"+strconv.Itoa(i%2+1))})
	}
	return p
}

func TestPlanRefuses(t *testing.T) {
	dir := t.TempDir()
	cases := map[string]func(p *Plan){
		"name":         func(p *Plan) { p.Name = "a b" },
		"relative dir": func(p *Plan) { p.Dir = "jobs" },
		"no tasks":     func(p *Plan) { p.Tasks = nil },
		"no command":   func(p *Plan) { p.TaskCommand = " " },
		"memory":       func(p *Plan) { p.MemoryMB = 0 },
		"cpus":         func(p *Plan) { p.CPUs = 0 },
		"time":         func(p *Plan) { p.TimeLimit = "2h; rm" },
		"partition":    func(p *Plan) { p.Partition = "a;b" },
		"same out":     func(p *Plan) { p.Tasks[1].Out = p.Tasks[0].Out + "/" },
		"bad shard":    func(p *Plan) { p.Tasks[0].Shard = 3 },
		"backslash":    func(p *Plan) { p.Dir = `/scratch/a\b` },
		"tab in dir":   func(p *Plan) { p.Dir = "/scratch/a\tb" },
	}
	for name, edit := range cases {
		p := testPlan(dir, 2, "true")
		edit(p)
		if _, err := p.Write(); !errors.Is(err, ErrPlan) {
			t.Errorf("%s: got %v, want ErrPlan", name, err)
		}
	}
}

// TestTimeAndPartition: SLURM's own forms of a time limit (minutes,
// minutes:seconds, hours:minutes:seconds, days-hours, days-hours:minutes,
// days-hours:minutes:seconds, UNLIMITED or INFINITE; sbatch's manual) and
// a partition list (gpu,cpu) were refused as a bad plan, which the batch
// reported as a bug (exit 3; found by the batch audit of 2026-12-05);
// forms sbatch does not take are refused with an example.
func TestTimeAndPartition(t *testing.T) {
	for _, ok := range []string{"30", "30:00", "02:00:00", "1-0", "1-12:00", "2-00:00:00", "UNLIMITED", "infinite"} {
		if err := CheckTime(ok); err != nil {
			t.Errorf("time %q refused: %v", ok, err)
		}
	}
	for _, bad := range []string{"2h", "::", "1-", "-5", "1:2:3:4", "02:00:00; rm", "unlimited!"} {
		if err := CheckTime(bad); err == nil || !strings.Contains(err.Error(), "02:00:00") {
			t.Errorf("time %q: %v, want a refusal with an example", bad, err)
		}
	}
	for _, ok := range []string{"debug", "gpu,cpu", "long-2.x"} {
		if err := CheckPartition(ok); err != nil {
			t.Errorf("partition %q refused: %v", ok, err)
		}
	}
	for _, bad := range []string{"a b", "gpu,", ",gpu", "a;b", "x'y"} {
		if err := CheckPartition(bad); err == nil {
			t.Errorf("partition %q accepted", bad)
		}
	}
	p := testPlan(t.TempDir(), 2, "true")
	p.TimeLimit, p.Partition = "UNLIMITED", "gpu,cpu"
	if _, err := p.Write(); err != nil {
		t.Errorf("plan with UNLIMITED and gpu,cpu: %v", err)
	}
}

// TestArrayScriptLocally runs the written array script with bash (no
// scheduler), as SLURM would run each array task: the task's command sees
// its study, shard and folder; the marker is written only after success;
// a finished task is skipped; a failed task leaves no marker.
func TestArrayScriptLocally(t *testing.T) {
	dir := t.TempDir()
	cmd := `echo "$AREASWEEP_STUDY $AREASWEEP_SHARD/$AREASWEEP_SHARDS" >"$AREASWEEP_OUT/result.txt"
echo run >>"$AREASWEEP_OUT/../runs-$AREASWEEP_SHARD"
[ "$AREASWEEP_STUDY" != s1 ] || [ "$AREASWEEP_SHARD" != 2 ] || [ ! -e "` + dir + `/fail" ] || exit 7`
	p := testPlan(dir, 4, cmd)
	f, err := p.Write()
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "fail"), nil, 0o644); err != nil {
		t.Fatal(err)
	}
	run := func(k int) (int, string) { return runArrayTask(t, f.Array, k) }
	for k := 1; k <= 4; k++ {
		code, out := run(k)
		if (k == 4) != (code == 7) {
			t.Fatalf("task %d exit %d:\n%s", k, code, out)
		}
	}
	if got := p.Pending(); !reflect.DeepEqual(got, []int{4}) {
		t.Fatalf("pending after the first round: %v, want [4]", got)
	}
	for k, tk := range p.Tasks {
		b, err := os.ReadFile(filepath.Join(tk.Out, "result.txt"))
		want := tk.Study + " " + strconv.Itoa(tk.Shard) + "/2\n"
		if err != nil || string(b) != want {
			t.Fatalf("task %d result %q, %v; want %q", k+1, b, err, want)
		}
	}
	os.Remove(filepath.Join(dir, "fail"))
	for k := 1; k <= 4; k++ {
		code, out := run(k)
		if code != 0 || (k < 4) != strings.Contains(out, "already finished, skipped") {
			t.Fatalf("second round, task %d exit %d:\n%s", k, code, out)
		}
	}
	if got := p.Pending(); len(got) != 0 {
		t.Fatalf("pending after the second round: %v", got)
	}
	// Each task ran once, except the failed one, which ran twice.
	for _, s := range []string{"s0", "s1"} {
		for _, sh := range []string{"1", "2"} {
			b, _ := os.ReadFile(filepath.Join(dir, "out", s, "runs-"+sh))
			want := 1
			if s == "s1" && sh == "2" {
				want = 2
			}
			if n := strings.Count(string(b), "run\n"); n != want {
				t.Errorf("%s shard %s ran %d times, want %d", s, sh, n, want)
			}
		}
	}
	// No temporary marker is left behind.
	left, _ := filepath.Glob(filepath.Join(dir, "out", "*", "*", "."+MarkerName+".*"))
	if len(left) > 0 {
		t.Errorf("temporary markers left: %v", left)
	}
	if code, out := run(9); code != 2 || !strings.Contains(out, "no line 9") {
		t.Errorf("task 9 of 4: exit %d, %s", code, out)
	}
}

// TestArrayScriptKeepsCommandsMarker: a task whose command writes its own
// marker (areasweep batch writes one with its settings checksum, which a
// later run compares) keeps that marker's lines, the task adding when and
// by which job; a failed task removes the output folder it made for the
// command when that folder stayed empty, and keeps a folder that existed.
func TestArrayScriptKeepsCommandsMarker(t *testing.T) {
	dir := t.TempDir()
	cmd := `[ "$AREASWEEP_STUDY" = s0 ] || exit 5
printf 'settings\tabc\nstudy\t%s\n' "$AREASWEEP_STUDY" >"$AREASWEEP_OUT/` + MarkerName + `"`
	p := testPlan(dir, 4, cmd)
	f, err := p.Write()
	if err != nil {
		t.Fatal(err)
	}
	kept := p.Tasks[3].Out
	if err := os.MkdirAll(kept, 0o755); err != nil {
		t.Fatal(err)
	}
	run := func(k int) (int, string) { return runArrayTask(t, f.Array, k, "SLURM_ARRAY_JOB_ID=77") }
	if code, out := run(1); code != 0 {
		t.Fatalf("task 1: exit %d: %s", code, out)
	}
	b, err := os.ReadFile(filepath.Join(p.Tasks[0].Out, MarkerName))
	if err != nil {
		t.Fatal(err)
	}
	m := string(b)
	if !strings.HasPrefix(m, "settings\tabc\nstudy\ts0\nfinished\t") || !strings.HasSuffix(m, "\njob\t77_1\n") {
		t.Errorf("marker:\n%s", m)
	}
	for k := 3; k <= 4; k++ {
		if code, out := run(k); code != 5 || !strings.Contains(out, "failed with status 5") {
			t.Fatalf("task %d: exit %d, want 5: %s", k, code, out)
		}
	}
	if _, err := os.Stat(p.Tasks[2].Out); !os.IsNotExist(err) {
		t.Errorf("the failed task left the folder it made: %v", err)
	}
	if _, err := os.Stat(kept); err != nil {
		t.Errorf("the failed task removed a folder that existed before it: %v", err)
	}
}

// runArrayTask runs the array script as task k of its job array would run
// (SLURM_ARRAY_TASK_ID=k, plus env), returning its exit code and output.
func runArrayTask(t *testing.T, script string, k int, env ...string) (int, string) {
	t.Helper()
	c := exec.Command("bash", script)
	c.Env = append(append(os.Environ(), "SLURM_ARRAY_TASK_ID="+strconv.Itoa(k)), env...)
	out, err := c.CombinedOutput()
	if ee, ok := err.(*exec.ExitError); ok {
		return ee.ExitCode(), string(out)
	} else if err != nil {
		t.Fatal(err)
	}
	return 0, string(out)
}

// TestSubmitErrorQuotesCommand: a refused submission quotes the command
// as it was run, --parsable included (it quoted "sbatch --array=..."
// while the command printed for the user reads "sbatch --parsable
// --array=..."), with sbatch's own words; a fake sbatch refuses.
func TestSubmitErrorQuotesCommand(t *testing.T) {
	bin := t.TempDir()
	if err := os.WriteFile(filepath.Join(bin, "sbatch"), []byte("#!/bin/sh\necho 'sbatch: error: no cluster here' >&2\nexit 1\n"), 0o755); err != nil {
		t.Fatal(err)
	}
	// exec looks sbatch up in this process's PATH.
	t.Setenv("PATH", bin+":"+os.Getenv("PATH"))
	s := Submitter{Env: os.Environ()}
	_, err := s.sbatch(context.Background(), "--array=1-2", "array.sh")
	want := "sbatch --parsable --array=1-2 array.sh: sbatch: error: no cluster here"
	if !errors.Is(err, ErrSubmit) || !strings.Contains(err.Error(), want) {
		t.Errorf("error %v, want ErrSubmit quoting %q", err, want)
	}
}

// TestSubmitReportsEachAcceptedJob: Accepted sees the array's id before
// the merge job is submitted (a stop signal ends the process at once, so
// the caller records it there): a fake sbatch accepts the array (id 41)
// and refuses the merge job, and Accepted has been called once with the
// array alone; with both accepted it is called again with both.
func TestSubmitReportsEachAcceptedJob(t *testing.T) {
	for _, mergeOK := range []bool{false, true} {
		bin := t.TempDir()
		count := filepath.Join(bin, "count")
		script := "#!/bin/sh\nn=$(cat " + count + " 2>/dev/null || echo 0)\nn=$((n + 1))\necho $n > " + count + "\n" +
			"if [ $n -eq 1 ]; then echo 41; exit 0; fi\n"
		if mergeOK {
			script += "echo 42\nexit 0\n"
		} else {
			script += "echo 'sbatch: error: queue full' >&2\nexit 1\n"
		}
		if err := os.WriteFile(filepath.Join(bin, "sbatch"), []byte(script), 0o755); err != nil {
			t.Fatal(err)
		}
		t.Setenv("PATH", bin+":"+os.Getenv("PATH"))
		var seen []Submission
		s := Submitter{Env: os.Environ(), Accepted: func(sub Submission) { seen = append(seen, sub) }}
		sub, err := s.Submit(context.Background(), &Plan{MaxParallel: 0}, Files{Array: "array.sh", Merge: "merge.sh"}, []int{1, 2})
		if mergeOK != (err == nil) {
			t.Fatalf("merge accepted %v: error %v", mergeOK, err)
		}
		want := []Submission{{ArrayJob: "41", Tasks: []int{1, 2}}}
		if mergeOK {
			want = append(want, Submission{ArrayJob: "41", MergeJob: "42", Tasks: []int{1, 2}})
		}
		if len(seen) != len(want) {
			t.Fatalf("merge accepted %v: Accepted called %d times (%v), want %d", mergeOK, len(seen), seen, len(want))
		}
		for i := range want {
			if seen[i].ArrayJob != want[i].ArrayJob || seen[i].MergeJob != want[i].MergeJob || !slices.Equal(seen[i].Tasks, want[i].Tasks) {
				t.Errorf("merge accepted %v: call %d saw %+v, want %+v", mergeOK, i, seen[i], want[i])
			}
		}
		if sub.ArrayJob != "41" {
			t.Errorf("merge accepted %v: submission %+v", mergeOK, sub)
		}
	}
}
