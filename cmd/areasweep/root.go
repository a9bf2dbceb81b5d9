package main

import (
	"errors"
	"fmt"
	"io"
	"log"
	"os"
	"path/filepath"
	"regexp"
	"runtime/debug"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/stopsig"
	"areasweep/extent"
	"areasweep/extent/gdalmsg"
	"areasweep/report"
)

// Exit codes, defined once; README "Exit codes" and the --help text of
// the root command list them.
const (
	exitOK       = 0 // success
	exitFailed   = 1 // the run failed for an outside reason (disk full, a file removed during the run)
	exitBadInput = 2 // bad input or settings: nothing was written
	exitInternal = 3 // a bug in areasweep (a recovered crash): please report
	// A run stopped by a signal exits with 128 + the signal number
	// (130 for SIGINT, 143 for SIGTERM, 129 for SIGHUP, 131 for SIGQUIT).
)

const exitCodesHelp = `Exit codes:
  0    success
  1    the run failed for an outside reason (disk full, out of memory, a file changed or removed during the run)
  2    bad input or settings; nothing was written
  3    internal error (a bug in areasweep); please report it
  128+N  stopped by signal N (130 Ctrl-C, 143 SIGTERM, 129 SIGHUP, 131 Ctrl-\); partial results removed`

// version is the software version, set at build time with
// -ldflags "-X main.version=...".
var version = "0.1.0-dev"

// IO holds the streams commands use; tests pass buffers.
type IO struct {
	In     io.Reader
	Out    io.Writer
	ErrOut io.Writer
	// Terminal is true when ErrOut is a terminal (progress bars are drawn).
	Terminal bool
}

// runLog is the log of the run in progress, for a crash report.
var runLog struct {
	mu sync.Mutex
	b  *pipeline.Log
}

func setRunLog(b *pipeline.Log) {
	runLog.mu.Lock()
	runLog.b = b
	runLog.mu.Unlock()
}

// stoppedNote is what a signal's message says of the outputs: a run's
// own, or the batch's (batchRun sets it: the studies finished before the
// signal stay).
var stoppedNote atomic.Pointer[string]

// inBatch is set while a batch's note is in place (swapStoppedNote).
var inBatch atomic.Bool

func init() {
	note := "this run's partial results were removed and --out was left as it was"
	stoppedNote.Store(&note)
}

// Main runs the command line args and returns the exit code. GDAL is set
// up once here (drivers, configuration, the message recorder); a signal
// removes the run's staging folder and exits with 128+N; a panic is
// recovered, reported in one line and its trace written to a run.log.
func Main(args []string, in io.Reader, out, errOut io.Writer) (code int) {
	// The signals have been caught since the program's first package
	// inits (stopsig); one caught meanwhile is handled here at once,
	// before GDAL is set up.
	sigs := stopsig.Listen()
	stop := make(chan struct{})
	defer func() { stopsig.Stop(); close(stop) }()
	terminal := isTerminal(errOut)
	gate := &stopGate{w: errOut}
	errOut = gate
	go func() {
		select {
		case s := <-sigs:
			msg := "areasweep: " + stoppedMessage(s) + "\n"
			if terminal {
				// A progress bar's line (and the terminal's echo of
				// ^C) is cleared: the message starts its own line.
				msg = "\r\x1b[K" + msg
			}
			report.EndTempWork() // no folder of the PDF writer's left in TMPDIR
			gate.closeWith(msg)
			os.Exit(128 + int(s.(syscall.Signal)))
		case <-stop:
		}
	}()
	// Relative paths are resolved as the system resolves them, from the
	// physical current folder: Go's os.Getwd (behind filepath.Abs)
	// prefers $PWD, the shell's path, so that in a folder entered through
	// a symbolic link "../x" named another folder for areasweep than for
	// GDAL, the system and every other program (--out ../res went
	// beside the link, a batch table ../t.csv had its rows' paths resolved
	// there and refused as missing).
	if wd, err := syscall.Getwd(); err == nil {
		os.Setenv("PWD", wd)
	}
	extent.Configure()
	gdalmsg.Install()
	log.SetFlags(0)
	log.SetOutput(gdalmsg.GoLog) // a Go library's log lines go to the run log, not the terminal
	defer func() {
		if r := recover(); r != nil {
			outdir.AbortAll()
			code = reportCrash(r, debug.Stack(), errOut)
		}
	}()

	streams := &IO{In: in, Out: out, ErrOut: errOut, Terminal: terminal}
	root := newRootCmd(streams)
	root.SetArgs(args)
	root.SetOut(out)
	root.SetErr(errOut)
	err := root.Execute()
	if err == nil {
		return exitOK
	}
	if !fault.IsBadInput(err) && !fault.IsInternal(err) && strings.HasPrefix(err.Error(), "unknown command ") {
		// cobra's own refusal of a command it does not have.
		err = fault.BadInput(fmt.Errorf("%w (see 'areasweep --help')", err))
	}
	msg := strings.TrimRight(fault.UserText(err), "\n")
	if _, werr := os.Getwd(); werr != nil && !strings.Contains(msg, outdir.CwdGone) {
		msg += "; " + outdir.CwdGone // a relative path was most likely given
	}
	fmt.Fprintf(errOut, "areasweep: %s\n", msg)
	switch {
	case fault.IsBadInput(err):
		return exitBadInput
	case fault.IsInternal(err):
		fmt.Fprintln(errOut, "areasweep: this is a bug in areasweep; please report it with the command line and run.log")
		return exitInternal
	}
	return exitFailed
}

// stoppedMessage aborts the outputs in progress (outdir.AbortAll) and
// says what a stop signal s left. A signal in the last moments of a run
// or report, after its new outputs were moved into place, leaves them
// whole: the message says so rather than that the folder was left as it
// was (a batch's note stands: it speaks of all its studies).
func stoppedMessage(s os.Signal) string {
	note := *stoppedNote.Load()
	if out := outdir.AbortAll(); out != "" && !inBatch.Load() {
		note = fmt.Sprintf("it had already moved its complete new outputs into %s, which holds them whole", out)
	}
	return fmt.Sprintf("stopped by %s; %s", signalName(s), note)
}

// stopGate is standard error as Main's commands write to it: once a stop
// signal's message is written (closeWith), what the run's goroutines
// still write before the process exits (a log line, a progress bar's
// redraw) is dropped, so that the message is the last line (a line of
// the pass, or a bar drawn over the message, used to follow it).
type stopGate struct {
	mu     sync.Mutex
	w      io.Writer
	closed bool
}

func (g *stopGate) Write(p []byte) (int, error) {
	g.mu.Lock()
	defer g.mu.Unlock()
	if g.closed {
		return len(p), nil
	}
	return g.w.Write(p)
}

// closeWith writes msg, the last thing written.
func (g *stopGate) closeWith(msg string) {
	g.mu.Lock()
	defer g.mu.Unlock()
	if !g.closed {
		io.WriteString(g.w, msg)
	}
	g.closed = true
}

func signalName(s os.Signal) string {
	switch s {
	case syscall.SIGINT:
		return "SIGINT (Ctrl-C)"
	case syscall.SIGTERM:
		return "SIGTERM"
	case syscall.SIGHUP:
		return "SIGHUP"
	case syscall.SIGQUIT:
		return "SIGQUIT (Ctrl-\\)"
	}
	return s.String()
}

// reportCrash writes the log so far and the trace into run.log in a new
// folder under the temporary directory, prints one line, and returns the
// internal-error code. The staging folder is gone by then, so the crash
// file cannot sit in --out.
func reportCrash(r any, stack []byte, errOut io.Writer) int {
	where := "(the crash report could not be written)"
	if dir, err := os.MkdirTemp("", "areasweep-crash-"); err == nil {
		var b strings.Builder
		runLog.mu.Lock()
		if runLog.b != nil {
			b.WriteString(runLog.b.String())
		}
		runLog.mu.Unlock()
		fmt.Fprintf(&b, "internal error: %v\n\n%s", r, stack)
		p := filepath.Join(dir, "run.log")
		if os.WriteFile(p, []byte(b.String()), 0o644&^outdir.Umask) == nil {
			where = p
		}
	}
	msg := strings.SplitN(fmt.Sprint(r), "\n", 2)[0]
	if len(msg) > 200 {
		msg = msg[:200] + "..."
	}
	fmt.Fprintf(errOut, "areasweep: internal error (%s); this is a bug, please report it with %s\n", msg, where)
	return exitInternal
}

func newRootCmd(streams *IO) *cobra.Command {
	root := &cobra.Command{
		Use:   "areasweep",
		Short: "Rescore a distribution model on a family of extents: is the score the model's or the extent's?",
		Long: `areasweep builds a family of alternative evaluation extents from a base
study region (geodesic buffers in and out, buffers around occurrences, convex hulls,
occupied ecoregion units, the whole raster), recomputes full ROC AUC, partial ROC,
threshold omission with binomial tests and the continuous Boyce index on each, and
reports how much of each score comes from the extent rather than from the model.

` + exitCodesHelp,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetVersionTemplate(versionLine() + "\n")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		// pflag quotes the value in full (twice): a long one is cut
		// (cutQuoted) once the message is in our words.
		if m := numberError.FindStringSubmatch(err.Error()); m != nil {
			what := map[string]string{"Uint": "a whole number of 0 or more in decimal digits", "Int": "a whole number in decimal digits", "Float": "a number", "Bool": "true or false"}[m[2]]
			why := "is not " + what
			if m[4] == "value out of range" {
				why = "is out of range"
			}
			return fault.BadInput(errors.New(cutQuoted(fmt.Sprintf("%s: %q %s (see '%s --help')", m[1], m[3], why, c.CommandPath()))))
		}
		if m := givenTwiceError.FindStringSubmatch(err.Error()); m != nil {
			return fault.BadInput(errors.New(cutQuoted(fmt.Sprintf("%s (see '%s --help')", m[1], c.CommandPath()))))
		}
		if m := unknownFlagError.FindStringSubmatch(err.Error()); m != nil {
			// A suggestion is close to the name given, so the name is
			// short (no cutQuoted needed).
			if s := suggestFlag(c, m[1]); s != "" {
				return fault.BadInput(fmt.Errorf("unknown flag: --%s; did you mean --%s? (see '%s --help')", m[1], s, c.CommandPath()))
			}
		}
		if cut := cutQuoted(err.Error()); cut != err.Error() {
			err = errors.New(cut)
		}
		return fault.BadInput(fmt.Errorf("%w (see '%s --help')", err, c.CommandPath()))
	})
	root.AddCommand(
		newRunCmd(streams, nil),
		newExtentsCmd(streams, nil),
		newReportCmd(streams, nil),
		newMergeCmd(streams, nil),
		newBatchCmd(streams, nil),
		newDemoCmd(streams, nil),
		newVersionCmd(streams),
	)
	// cobra's completion command, having no Run, prints its help and exits
	// 0 for a shell it has no script for. Runnable, it has its arguments
	// checked like any command: an unknown shell is an unknown command,
	// bad input (wrapArgs).
	root.InitDefaultCompletionCmd()
	if c, _, err := root.Find([]string{"completion"}); err == nil && c != root {
		c.RunE = func(c *cobra.Command, _ []string) error { return c.Help() }
	}
	// cobra's help command prints "Unknown help topic" and exits 0 for a
	// command it does not have: refuse it like an unknown command.
	root.InitDefaultHelpCmd()
	if h, _, err := root.Find([]string{"help"}); err == nil && h != root && h.Run != nil {
		show := h.Run
		h.Run = nil
		h.RunE = func(c *cobra.Command, args []string) error {
			if t, _, err := root.Find(args); t == nil || err != nil {
				return fault.BadInput(fmt.Errorf("no help for %q: it is not a command of areasweep (see 'areasweep --help')", strings.Join(args, " ")))
			}
			show(c, args)
			return nil
		}
	}
	var wrap func(cs []*cobra.Command)
	wrap = func(cs []*cobra.Command) {
		for _, c := range cs {
			c.Args = wrapArgs(c.Args)
			wrap(c.Commands()) // completion's shells
		}
	}
	wrap(root.Commands())
	return root
}

// longQuoted is a quoted value of more than 80 characters in a flag's
// error (pflag's "invalid argument %q", Go's "parsing %q").
var longQuoted = regexp.MustCompile(`"((?:[^"\\]|\\.){81,}?)"`)

// cutQuoted shortens each long quoted value in msg to its first 60
// characters and its length: a 100,000-digit --seed made a message of
// 200 kB.
func cutQuoted(msg string) string {
	return longQuoted.ReplaceAllStringFunc(msg, func(q string) string {
		in := q[1 : len(q)-1]
		r := []rune(in)
		if len(r) <= 80 {
			return q
		}
		return fmt.Sprintf("\"%s...\" (%d characters)", string(r[:60]), len(r))
	})
}

// argCountError matches cobra's message for a command given too many or
// too few arguments (ExactArgs(1), MaximumNArgs(1)).
var argCountError = regexp.MustCompile(`^accepts (at most )?1 arg\(s\), received \d+$`)

// unknownFlagError matches pflag's message for a long flag the command
// does not have; its group is the name as given (without --).
var unknownFlagError = regexp.MustCompile(`^unknown flag: --(.+)$`)

// suggestFlag returns the name of c's flag (hidden ones left out) nearest
// to name, a flag c does not have, or "" (inputs.Closest: a typo, a case
// or '_' slip, or the start of one flag's name).
func suggestFlag(c *cobra.Command, name string) string {
	var names []string
	c.Flags().VisitAll(func(f *pflag.Flag) {
		if !f.Hidden {
			names = append(names, f.Name)
		}
	})
	return inputs.Closest(name, names)
}

// givenTwiceError matches pflag's message for a flag given twice, or a
// path flag given empty (onceString), whose own words say it all: pflag's "invalid argument
// ... for ... flag:" before them is cut.
var givenTwiceError = regexp.MustCompile(`^invalid argument ".*" for ".*" flag: (--[a-z-]+ is (?:given twice|empty;) .*)$`)

// numberError matches pflag's message for a flag value Go cannot parse,
// which quotes Go's own parser ("strconv.ParseUint: parsing ..."): the
// flag part, the parser's type, the value and the reason.
var numberError = regexp.MustCompile(`^(invalid argument ".*" for ".*" flag): strconv\.Parse(Uint|Int|Float|Bool): parsing "(.*)": (invalid syntax|value out of range)$`)

// wrapArgs marks argument-count errors as bad input, with the pointer to
// the command's help that flag errors carry.
func wrapArgs(a cobra.PositionalArgs) cobra.PositionalArgs {
	if a == nil {
		return nil
	}
	return func(c *cobra.Command, args []string) error {
		err := a(c, args)
		switch {
		case err == nil:
			return nil
		case strings.Contains(err.Error(), "--help"): // the command's own message
			return fault.BadInput(err)
		case strings.HasPrefix(err.Error(), "unknown command ") && !c.HasSubCommands() && len(args) > 0:
			// cobra calls a stray word an unknown command even where
			// the command has none: most often a value without its flag.
			hint := ""
			if c.Flags().Lookup("out") != nil {
				hint = ": give each value after its flag, e.g. --out DIR"
			}
			if ext := strings.ToLower(filepath.Ext(args[0])); (ext == ".yaml" || ext == ".yml") && c.Flags().Lookup("study") != nil {
				// 'areasweep run study.yaml', as batch takes its table.
				hint = fmt.Sprintf(": a study file is given with --study (%s --study %s)", c.CommandPath(), args[0])
			}
			return fault.BadInput(fmt.Errorf("'%s' takes no arguments, got %q%s (see '%s --help')", c.CommandPath(), args[0], hint, c.CommandPath()))
		case strings.HasPrefix(err.Error(), "unknown command "): // names the command itself
			return fault.BadInput(fmt.Errorf("%w (see '%s --help')", err, c.CommandPath()))
		}
		if m := argCountError.FindStringSubmatch(err.Error()); m != nil {
			// cobra's "accepts 1 arg(s), received 2", in our words.
			what := strings.TrimSpace(strings.TrimPrefix(c.Use, c.Name()))
			got := "none"
			if len(args) > 0 {
				q := make([]string, len(args))
				for i, a := range args {
					q[i] = fmt.Sprintf("%q", a)
				}
				got = fmt.Sprintf("%d: %s", len(args), strings.Join(q, ", "))
			}
			return fault.BadInput(errors.New(cutQuoted(fmt.Sprintf("'%s' takes %sone argument, %s (got %s) (see '%s --help')", c.CommandPath(), m[1], what, got, c.CommandPath()))))
		}
		return fault.BadInput(fmt.Errorf("%s %w (see 'areasweep %s --help')", c.Name(), err, c.Name()))
	}
}
