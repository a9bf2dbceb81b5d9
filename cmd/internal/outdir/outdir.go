// Package outdir guards the output folder of a run (--out) so that no run
// loses data: it checks --out against the inputs, locks it, stages the
// results beside or inside it and moves them into place at the end, or
// removes them on an error, a signal or a crash.
//
// It is a package of its own, not part of the pipeline, because the
// command's demo (which writes its generated inputs into the staging
// folder first) and later commands that write into an output folder use it
// without running a sweep.
package outdir

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"time"

	"areasweep/cmd/internal/fault"
	"areasweep/report"
	"areasweep/report/outfile"
)

// The output directory of a run is guarded so that no run loses data:
//
//   - --out may not be, or contain, a folder holding an input, and may not
//     lie inside an input that is itself a folder (a FileGDB); --force does
//     not change this.
//   - A lock file beside --out (.NAME.areasweep-lock, holding the owner's
//     PID) is held with flock from before the first write to the end, and
//     removed then. A second run on the same --out is refused while the
//     first runs. The kernel drops the lock when a process dies, so holding
//     it proves that every staging folder of this --out left behind belongs
//     to a dead run: those are removed at the start.
//   - Results are written into a staging folder, named with the owner's
//     PID, beside --out (or inside --out when it already exists, so that
//     the final moves stay on one file system). At the end the staged
//     entries are moved into --out. Without --force nothing in --out is
//     replaced: a name that appeared in --out during the run stops the move
//     and the results are kept in a visible folder. With --force the
//     entries areasweep writes (outputNames) are replaced as a set and any
//     other file in --out is left alone; an entry of those names is
//     replaced only when the record a run leaves in --out (record.go)
//     lists it, so a file of the user's that bears such a name is never
//     replaced.

// outputNames are the entries of --out that areasweep writes; --force
// replaces these, and only these.
var outputNames = []string{"results.json", "scores.csv", "extents.gpkg", "extents.csv", "extents.tif",
	"omitted_points.gpkg", "report.html", "methods.md", "figures", "run.log"}

const (
	lockSuffix     = ".areasweep-lock"
	stagePrefix    = ".areasweep-partial-"
	holdPrefix     = ".areasweep-old-"
	oldStageMarker = ".partial-" // staging folders of earlier versions: .NAME.partial-*
	// OwnerName is the record inside every staging and set-aside folder
	// (see owner.go): whose folder it is, for which --out. A folder left
	// by a dead run is removed only when it holds it.
	OwnerName = ".areasweep-owner"
	// recordPrefix begins the names of areasweep's own hidden records
	// that a run may stage with its outputs (a batch's completion marker,
	// .areasweep-done): they are moved into --out after every output.
	recordPrefix = ".areasweep-"
)

// Dir is a locked output directory and its staging folder. Write the
// results into Stage, then call Finish; call Abort on every other path
// (it does nothing after Finish).
type Dir struct {
	Out   string // as given, cleaned
	Stage string // the staging folder the results are written into
	// Demo marks the demo's run: inputs/ is also an output entry.
	Demo bool
	// Shard marks a shard's run (run --shard): it writes only its partial
	// file and log, and --force replaces only those, never another
	// shard's files or a whole run's outputs in the same folder.
	Shard bool
	// Cleaned is the number of staging folders of dead runs removed.
	Cleaned int
	// Kept are the folders named like this --out's staging folders that
	// were left as they are: they hold no owner record of this --out, or
	// their run still lives on this machine (see cleanDead).
	Kept []string

	abs     string
	parent  string
	name    string
	force   bool
	lock    *os.File
	created []string // parent folders this run made, deepest first
	// demoInputs are the names of the files the demo writes into inputs/.
	demoInputs []string
	mu         sync.Mutex
	done       bool
}

// active are the output directories of runs in progress, for the signal
// handler.
var active struct {
	mu   sync.Mutex
	dirs []*Dir
	// stopping is set by AbortAll: the process is about to exit, so a
	// run that opens its --out or a Stage after that creates nothing
	// (in a batch a study started between the signal and the exit left
	// its lock file and staging folder behind).
	stopping bool
}

// errStopping refuses an output folder opened after AbortAll.
var errStopping = errors.New("stopped by a signal; nothing was written")

// Umask is the process umask, read once at start (outfile.Umask); folders
// are created with 0777 &^ Umask like mkdir(1) does, and files with
// 0666 &^ Umask.
var Umask = outfile.Umask

// MkdirPerm is the mode of folders areasweep creates.
func MkdirPerm() os.FileMode { return 0o777 &^ Umask }

// CheckUmask refuses a umask that takes any of the owner's own
// permissions from what areasweep creates (umask 277, 222, 777): its
// staging folder, made 0700 &^ umask, could not be written into (nor a
// GeoPackage it wrote read back), and the message blamed the folder that
// holds --out ("cannot write in ... (permission denied); choose a folder
// you can write to"), which changing folder does not mend.
func CheckUmask() error {
	if Umask&0o700 != 0 {
		return fault.BadInput(fmt.Errorf("the umask is %04o, which takes your own permissions from the files and folders areasweep creates, so it could not write into them or read them back; set a umask that leaves them, such as 022 or 077 (the shell's command umask 022), and run again", uint32(Umask)))
	}
	return nil
}

// Open checks --out against the inputs, locks it, removes staging
// folders of dead runs and makes this run's staging folder.
func Open(out string, force bool, inputs []string) (*Dir, error) {
	return open(out, force, inputs, false, nil, nil)
}

// OpenShard is Open for a shard's run, which replaces only its own
// partial file and log (Dir.Shard), whatever else --out holds; own are
// their names, so that a folder standing where one of them goes is
// refused before the work, not found when the results are moved in.
func OpenShard(out string, force bool, inputs, own []string) (*Dir, error) {
	return open(out, force, inputs, false, nil, shardNames(own))
}

// shardNames is own as a shard's names: never nil, so that check knows
// the run as a shard's even when it names no file.
func shardNames(own []string) []string {
	if own == nil {
		return []string{}
	}
	return own
}

// OpenDemo is Open for the demo, whose inputs/ folder is an output entry
// too: --force replaces it, so it may hold only the demo's own files.
func OpenDemo(out string, force bool, inputFiles []string) (*Dir, error) {
	return open(out, force, nil, true, inputFiles, nil)
}

// foreign lists, as paths under --out, what the folders among names hold
// that areasweep does not write there: in figures/ a name that is neither
// a figure file (report.IsFigureFile) nor a temporary file a killed
// report can leave (outfile.IsTemp), in the demo's inputs/ a name not among its files, and any
// sub-folder, and a file where areasweep writes that folder. --force
// replaces such a folder as a whole, so these would be deleted with it. staged, when not "", is the staging folder: an entry
// the staged folder of the same name holds is areasweep's too.
func (d *Dir) foreign(names []string, staged string) []string {
	var found []string
	for _, n := range names {
		if n != "figures" && !(n == "inputs" && d.Demo) {
			continue
		}
		if st, err := os.Lstat(filepath.Join(d.abs, n)); err == nil && !st.IsDir() {
			found = append(found, filepath.Join(d.Out, n)) // areasweep writes a folder there
			continue
		}
		entries, err := os.ReadDir(filepath.Join(d.abs, n))
		if err != nil {
			continue // absent
		}
		for _, e := range entries {
			ours := !e.IsDir()
			if ours && n == "figures" {
				ours = report.IsFigureFile(e.Name()) || outfile.IsTemp(e.Name())
			} else if ours {
				ours = slices.Contains(d.demoInputs, e.Name())
			}
			if !ours && staged != "" {
				if st, err := os.Lstat(filepath.Join(staged, n, e.Name())); err == nil && !st.IsDir() && !e.IsDir() {
					ours = true
				}
			}
			if !ours {
				found = append(found, filepath.Join(d.Out, n, e.Name()))
			}
		}
	}
	return found
}

// folderAtFile returns the first of names (entries of --out) where
// areasweep writes a file but a folder stands (not a link to one), as a
// path under --out, or "". --force replaces the entry, so the folder and
// everything in it would be deleted: a folder results.json/ of the user's
// went without a word.
func (d *Dir) folderAtFile(names []string) string {
	for _, n := range names {
		if n == "figures" || (n == "inputs" && d.Demo) {
			continue // areasweep's folders: see foreign
		}
		if st, err := os.Lstat(filepath.Join(d.abs, n)); err == nil && st.IsDir() {
			return filepath.Join(d.Out, n)
		}
	}
	return ""
}

// folderAtFileError is the refusal of a folder found by folderAtFile.
func folderAtFileError(out, folder string) error {
	return fmt.Errorf("--out %s holds the folder %s where areasweep writes a file of that name, which --force replaces (the folder with everything in it); move or rename the folder, or choose another --out", out, folder)
}

// NotEmptyError is the refusal of an --out that exists and holds files
// without --force: only --force gets past it (a batch says so for the
// studies it stops).
type NotEmptyError struct{ Out string }

func (e *NotEmptyError) Error() string {
	return fmt.Sprintf("--out %s exists and is not empty; add --force to replace areasweep's files in it, or choose another directory", e.Out)
}

// BatchOwnDir is the folder of a batch's own files inside the batch's
// --out (batchrun.OwnDir); its presence marks the folder as a batch's.
const BatchOwnDir = ".areasweep-batch"

// batchFolderError refuses a batch's --out as the --out of one run
// (run, extents, a shard, merge, the demo), --force or not: the run's
// files would lie among the batch's study folders and summary, and
// --force would replace the run's entries there as its own.
func batchFolderError(out string) error {
	return fmt.Errorf("--out %s is a batch's folder (it holds %s, the batch's summary and a folder per study); one run's results would be mixed among them: choose another --out, e.g. %s", out, filepath.Join(filepath.Clean(out), BatchOwnDir), filepath.Clean(out)+"-run")
}

// InUseError is the refusal of an --out another run holds (its lock):
// nothing about the inputs or settings is wrong, the run can only wait
// (a batch names no table row for it).
type InUseError struct{ Out, Who string }

func (e *InUseError) Error() string {
	return fmt.Sprintf("--out %s is in use: %s is writing to it; wait for it to finish or choose another --out", e.Out, e.Who)
}

// foreignError is the message for foreign files in a folder --force
// would replace.
func foreignError(out string, found []string) error {
	var dirs []string
	for _, f := range found {
		if d := filepath.Dir(f); !slices.Contains(dirs, d) {
			dirs = append(dirs, d)
		}
	}
	dir := strings.Join(dirs, " and ")
	return fmt.Errorf("--out %s holds %s, not written by areasweep, in %s, which --force replaces as a whole; "+
		"move it out of %s, or choose another --out", out, firstThree(found), dir, dir)
}

func open(out string, force bool, inputs []string, demo bool, demoInputs, shard []string) (*Dir, error) {
	d, exists, err := check(out, force, inputs, demo, demoInputs, shard)
	if err != nil {
		return nil, err
	}
	return d.open(out, exists)
}

// Check makes the refusals of Open (OpenShard when shard is not nil: the
// shard's own file names) that need no
// write: those of check, and a folder areasweep could not write in (the
// one --out's lock file goes in, or the nearest one above it that exists
// when it is missing, and --out itself when it exists), which the system
// tells as for the user (access(2); root passes). A run makes them before
// its long work (reading the points, hashing the inputs), so that a
// forgotten --force or a folder of another user is refused at once; Open
// makes them all again when it writes.
func Check(out string, force bool, inputs, shard []string) error {
	d, exists, err := check(out, force, inputs, false, nil, shard)
	if err != nil {
		return err
	}
	lockDir := d.parent
	for {
		if _, err := os.Stat(lockDir); err == nil || filepath.Dir(lockDir) == lockDir {
			break
		}
		lockDir = filepath.Dir(lockDir)
	}
	if err := access(lockDir, 3); err != nil { // W_OK | X_OK
		return d.lockRefusal(out, lockDir, err)
	}
	if exists {
		if err := access(d.abs, 3); err != nil {
			return cannotWrite(out, d.abs, err)
		}
	}
	return nil
}

// access is syscall.Access; tests replace it to meet a folder they cannot
// write to (they run as root too).
var access = syscall.Access

// check makes Open's refusals that need no write and returns the Dir they
// describe and whether --out exists. shardFiles, when not nil, are the
// names a shard's run writes (its --out may hold anything else).
func check(out string, force bool, inputs []string, demo bool, demoInputs, shardFiles []string) (*Dir, bool, error) {
	shard := shardFiles != nil
	if out == "" {
		return nil, false, fault.BadInput(errors.New("--out is empty; name an output directory"))
	}
	if err := CheckUmask(); err != nil {
		return nil, false, err
	}
	if err := TildeError("--out", out); err != nil {
		return nil, false, err
	}
	d := &Dir{Out: filepath.Clean(out), force: force, Demo: demo, Shard: shard, demoInputs: demoInputs}
	abs, err := systemAbs(out)
	if err != nil {
		return nil, false, fault.BadInput(fmt.Errorf("--out %s is a relative path and %s", out, CwdGone))
	}
	d.abs = abs
	d.parent, d.name = filepath.Dir(d.abs), filepath.Base(d.abs)
	if d.abs == d.parent {
		return nil, false, fault.BadInput(fmt.Errorf("--out %s is the root folder; name a folder for the results", out))
	}
	if strings.ContainsAny(d.abs, "\n\r") {
		return nil, false, fault.BadInput(LineBreakError("--out", out, d.abs))
	}
	if err := checkOutVsInputs(d.abs, out, inputs); err != nil {
		return nil, false, err
	}
	if err := d.lengthError(out); err != nil {
		return nil, false, err
	}
	st, err := os.Stat(d.abs)
	exists := err == nil
	if exists {
		if !st.IsDir() {
			return nil, false, fault.BadInput(fmt.Errorf("--out %s exists and is not a directory; name a folder for the results (a new one, or one areasweep wrote before)", out))
		}
		entries, err := os.ReadDir(d.abs)
		if err != nil {
			return nil, false, fault.BadInput(fmt.Errorf("--out %s cannot be read: %w", out, err))
		}
		if st, err := os.Lstat(filepath.Join(d.abs, BatchOwnDir)); err == nil && st.IsDir() {
			return nil, false, fault.BadInput(batchFolderError(out))
		}
		if len(visible(entries)) > 0 && !force {
			return nil, false, fault.BadInput(&NotEmptyError{Out: out})
		}
		for _, n := range []string{"figures", "inputs"} {
			if n == "inputs" && !demo || shard {
				continue
			}
			if st, err := os.Lstat(filepath.Join(d.abs, n)); err == nil && !st.IsDir() {
				return nil, false, fault.BadInput(fmt.Errorf("--out %s holds %s, a file where areasweep writes a folder of that name; move or rename it, or choose another --out", out, filepath.Join(d.Out, n)))
			}
		}
		if found := d.foreign([]string{"figures", "inputs"}, ""); len(found) > 0 && !shard {
			return nil, false, fault.BadInput(foreignError(out, found))
		}
		own := outputNames
		if shard {
			own = shardFiles
		}
		if f := d.folderAtFile(own); f != "" {
			return nil, false, fault.BadInput(folderAtFileError(out, f))
		}
		if demo {
			own = append(slices.Clip(own), "inputs")
		}
		if found := d.unrecorded(own); len(found) > 0 {
			return nil, false, fault.BadInput(unrecordedError(out, found))
		}
	} else if !errors.Is(err, os.ErrNotExist) {
		if errors.Is(err, syscall.ENOTDIR) {
			for p := filepath.Dir(d.abs); p != filepath.Dir(p); p = filepath.Dir(p) {
				if st, serr := os.Stat(p); serr == nil && !st.IsDir() {
					return nil, false, fault.BadInput(fmt.Errorf("--out %s cannot be used: %s on its path is a file, not a folder (%w); choose another --out", out, p, Cause(err)))
				}
			}
		}
		return nil, false, fault.BadInput(fmt.Errorf("--out %s cannot be used (%w); choose another --out", out, Cause(err)))
	} else if link, target := danglingLink(d.abs); link != "" {
		// The staging folder would be made beside the link and the whole
		// sweep run, only for the final move onto the link to fail.
		return nil, false, fault.BadInput(fmt.Errorf("--out %s cannot be used: %s on its path is a symbolic link to %s, which does not exist; create that folder, remove the link, or choose another --out", out, link, target))
	}
	return d, exists, nil
}

// lengthError refuses an --out (given as out) whose path is too long for
// the GeoPackages written in it (not for a shard's, which writes none),
// or whose last name is too long for the lock file and staging folder
// made beside it.
func (d *Dir) lengthError(out string) error {
	if n := d.longestStaged(); n > maxSQLitePath && !d.Shard {
		return fault.BadInput(fmt.Errorf("--out %s: its path is too long for the GeoPackage files written in it (SQLite opens a file whose path has at most %d bytes; a GeoPackage written in it while the run works would have up to %d): choose an --out with a path %d bytes shorter", out, maxSQLitePath, n, n-maxSQLitePath))
	}
	if n := d.longestBeside(); n > nameMax {
		return fault.BadInput(fmt.Errorf("--out %s: its last name is %d bytes, and the hidden lock file and staging folder areasweep makes beside it add %d: over the %d bytes a file name may have; choose a name of at most %d bytes", out, len(d.name), n-len(d.name), nameMax, nameMax-(n-len(d.name))))
	}
	return nil
}

// LengthError is the refusal Open makes of a run's --out out whose path
// or last name is too long (see lengthError), for a caller that checks
// folders before any run opens them (a batch, each study's folder before
// the first study runs); nil when out is fine or cannot be resolved.
func LengthError(out string) error {
	abs, err := systemAbs(out)
	if err != nil {
		return nil
	}
	d := &Dir{Out: filepath.Clean(out), abs: abs}
	d.parent, d.name = filepath.Dir(d.abs), filepath.Base(d.abs)
	return d.lengthError(out)
}

// open writes what Open makes: the folders above --out that are missing,
// the lock file and the staging folder.
func (d *Dir) open(out string, exists bool) (*Dir, error) {
	// Registered and held from here, so that a signal (AbortAll) waits
	// until the lock and the staging folder exist and then removes both,
	// instead of missing them by a few microseconds.
	d.mu.Lock()
	defer d.mu.Unlock()
	active.mu.Lock()
	if active.stopping {
		active.mu.Unlock()
		d.done = true
		return nil, errStopping
	}
	active.dirs = append(active.dirs, d)
	active.mu.Unlock()
	fail := func(err error) (*Dir, error) {
		d.done = true
		d.release()
		return nil, err
	}
	if err := d.makeParent(out); err != nil {
		return fail(err)
	}
	if err := d.takeLock(out); err != nil {
		return fail(err)
	}
	d.cleanDead(exists)
	where, prefix := d.parent, "."+d.name+"."+stagePrefix[1:]
	if exists {
		where, prefix = d.abs, stagePrefix
	}
	stage, err := os.MkdirTemp(where, prefix+strconv.Itoa(os.Getpid())+"-")
	if err == nil {
		err = os.Chmod(stage, MkdirPerm())
	}
	if err == nil {
		err = writeOwner(stage, d.abs)
	}
	if err != nil {
		if stage != "" {
			os.RemoveAll(stage)
		}
		return fail(cannotWrite(out, where, err))
	}
	d.Stage = stage
	return d, nil
}

// danglingLink returns the deepest path on abs, which does not exist,
// that is a symbolic link whose target does not exist either, and that
// target as the link gives it; "" when there is none.
func danglingLink(abs string) (link, target string) {
	for p := abs; p != filepath.Dir(p); p = filepath.Dir(p) {
		st, err := os.Lstat(p)
		if err != nil {
			continue
		}
		if st.Mode()&os.ModeSymlink == 0 {
			return "", "" // an existing folder: what lies below it is made
		}
		t, err := os.Readlink(p)
		if err != nil {
			t = "?"
		}
		return p, t
	}
	return "", ""
}

// maxSQLitePath is the longest path of a file SQLite opens (its Unix
// layer's 512 bytes, less room for the "-journal" suffix); GDAL's
// GeoPackage driver then fails with "unable to open database file". Found
// by opening databases with paths of 500 to 519 bytes (Python's sqlite3,
// the system's SQLite): 504 opens, 505 does not. extent.MaxSQLitePath is
// the same bound for the inputs (not imported here: extent needs cgo).
const maxSQLitePath = 504

// longestStagedName is the longest path inside a staging folder of a file
// SQLite opens: the demo's ecoregions (omitted_points.gpkg is 3 bytes
// shorter).
const longestStagedName = "/inputs/ecoregions.gpkg"

// longestStaged is the length in bytes of the longest path of a GeoPackage
// written in the staging folder: the folder's name ends in this process's
// ID and a random number of at most 10 digits (os.MkdirTemp).
func (d *Dir) longestStaged() int {
	where, prefix := d.parent, "."+d.name+"."+stagePrefix[1:]
	if st, err := os.Stat(d.abs); err == nil && st.IsDir() {
		where, prefix = d.abs, stagePrefix
	}
	return len(where) + 1 + len(prefix) + len(strconv.Itoa(os.Getpid())) + 1 + 10 + len(longestStagedName)
}

// nameMax is the longest name of a file or folder (NAME_MAX: 255 bytes
// on Linux's file systems).
const nameMax = 255

// longestBeside is the length in bytes of the longest name areasweep
// gives a file or folder beside --out: its lock file, and the staging
// folder of an --out that does not exist yet (named like longestStaged's).
func (d *Dir) longestBeside() int {
	lock := 1 + len(d.name) + len(lockSuffix)
	if st, err := os.Stat(d.abs); err == nil && st.IsDir() {
		return lock
	}
	return max(lock, 1+len(d.name)+1+len(stagePrefix[1:])+len(strconv.Itoa(os.Getpid()))+1+10)
}

// UnexpandedTilde reports whether path starts with the home folder's ~
// as a shell writes it ("~" or "~/..."): a shell expands it only at the
// start of a word, so --out=~/runs reaches areasweep as it is.
func UnexpandedTilde(path string) bool {
	return path == "~" || strings.HasPrefix(path, "~/")
}

// TildeAdvice says what to do with path that starts with an unexpanded ~
// (UnexpandedTilde), naming flag (e.g. "--out") and the path the shell
// would have made of it when the home folder is known.
func TildeAdvice(flag, path string) string {
	full := ""
	if home, err := os.UserHomeDir(); err == nil {
		full = fmt.Sprintf(" (%s)", filepath.Join(home, path[1:]))
	}
	switch flag {
	case "--model", "--null", "--extra":
		// NAME=~/x: expanded by bash for some names only.
		return fmt.Sprintf("it starts with ~, which the shell did not turn into your home folder (a shell does so only at the start of a word, and after NAME= only for some names): give the full path%s", full)
	}
	return fmt.Sprintf("it starts with ~, which the shell did not turn into your home folder (a shell does so only at the start of a word, not after %s=): "+
		"write %s and the path apart (%s %s) or give the full path%s", flag, flag, flag, path, full)
}

// TildeError refuses the folder to write in, flag given as path, when it
// starts with an unexpanded ~: a folder named ~ would be made in the
// current folder (and removing it with rm -r ~ removes the home folder).
func TildeError(flag, path string) error {
	if !UnexpandedTilde(path) {
		return nil
	}
	return fault.BadInput(fmt.Errorf("%s %s: %s; areasweep does not make a folder named ~", flag, path, TildeAdvice(flag, path)))
}

// CwdGone says that the current folder was removed (os.Getwd fails), with
// what to do.
const CwdGone = "the current folder no longer exists (removed after the shell entered it), so relative paths name nothing: cd to an existing folder, or give absolute paths"

// LineBreakError refuses a folder to write in (what: "--out", or the
// report's folder) given as given whose absolute path abs holds a line
// break: the owner record of its staging folder is one line per field. The
// names are quoted, so that the message stays on one line.
func LineBreakError(what, given, abs string) error {
	where := fmt.Sprintf("%s %q", what, given)
	if abs != given {
		where += fmt.Sprintf(" (%q)", abs)
	}
	return fmt.Errorf("%s: the path holds a line break, which areasweep does not write under; choose a folder whose path has none", where)
}

// DiskFull reports whether err comes from a full disk or quota (ENOSPC,
// EDQUOT): an outside failure (exit 1) that freeing space mends, not a
// folder to refuse.
func DiskFull(err error) bool {
	c := Cause(err)
	return errors.Is(c, syscall.ENOSPC) || errors.Is(c, syscall.EDQUOT)
}

// cannotWrite words a failure to write in where, the folder of --out or
// the one it goes in, before the run wrote anything: a full disk says to
// free space (exit 1), anything else (a read-only disk, a folder of
// another user) is a refusal of --out (exit 2).
func cannotWrite(out, where string, err error) error {
	if DiskFull(err) {
		return fmt.Errorf("--out %s: cannot write in %s (%w): free some space on that disk, or give --out a folder on another one; nothing was written", out, where, Cause(err))
	}
	return fault.BadInput(fmt.Errorf("--out %s: cannot write in %s (%w); choose a folder you can write to", out, where, Cause(err)))
}

// visible drops areasweep's own hidden entries (a staging folder of a dead
// run, the lock file) from a listing of --out.
func visible(entries []os.DirEntry) []os.DirEntry {
	var v []os.DirEntry
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), stagePrefix) || strings.HasPrefix(e.Name(), holdPrefix) || strings.HasPrefix(e.Name(), stagedPrefix) || e.Name() == OwnerName {
			continue
		}
		v = append(v, e)
	}
	return v
}

// Cause is the part of a file-system error a user needs: the cause,
// without the repeated path (err itself when it is not a path error).
func Cause(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	return err
}

// RealPath is path made absolute as the system resolves it (systemAbs),
// with the symbolic links of its longest existing prefix resolved.
func RealPath(path string) string {
	abs, err := systemAbs(path)
	if err != nil {
		return path
	}
	return abs
}

// maxLinkHops bounds the symbolic links systemAbs follows in one path, as
// the kernel's own bound (40 on Linux) does.
const maxLinkHops = 40

// systemAbs returns path made absolute as the system resolves it: the
// current folder's real path, then each name in turn, a symbolic link
// replaced by its target before the names after it, so that a ".." after
// a link goes up from where the link points (lnk/../x lies beside the
// link's target, where mkdir lnk/../x makes it), not from where the link
// is, as filepath.Abs's cleaning of the text has it. From the first name
// that does not exist (or is a link to nothing) the rest is joined as
// written, cleaned. Every other symbolic link is resolved.
func systemAbs(path string) (string, error) {
	cur := string(filepath.Separator)
	if !filepath.IsAbs(path) {
		wd, err := os.Getwd()
		if err != nil {
			return "", err
		}
		if r, err := filepath.EvalSymlinks(wd); err == nil {
			wd = r
		}
		cur = wd
	}
	names := strings.Split(path, string(filepath.Separator))
	hops := 0
	for i := 0; i < len(names); i++ {
		switch n := names[i]; n {
		case "", ".":
			continue
		case "..":
			cur = filepath.Dir(cur)
			continue
		}
		next := filepath.Join(cur, names[i])
		st, err := os.Lstat(next)
		if err != nil {
			return filepath.Join(append([]string{next}, names[i+1:]...)...), nil
		}
		if st.Mode()&os.ModeSymlink == 0 {
			cur = next
			continue
		}
		target, err := os.Readlink(next)
		_, serr := os.Stat(next)
		if hops++; err != nil || serr != nil || hops > maxLinkHops {
			// A link that cannot be read, whose target does not exist
			// (danglingLink names it), or a loop: the rest as written,
			// the link kept, as the kernel would not follow it.
			return filepath.Join(append([]string{next}, names[i+1:]...)...), nil
		}
		if filepath.IsAbs(target) {
			cur = string(filepath.Separator)
		}
		names = append(strings.Split(target, string(filepath.Separator)), names[i+1:]...)
		i = -1
	}
	return cur, nil
}

// Inside reports whether path is the folder dir or lies inside it, both
// taken with their symbolic links resolved (a link to dir names dir).
func Inside(path, dir string) bool {
	return within(RealPath(path), RealPath(dir))
}

// within reports whether path is dir or lies inside it.
func within(path, dir string) bool {
	if path == dir {
		return true
	}
	rel, err := filepath.Rel(dir, path)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator)) && !filepath.IsAbs(rel)
}

// checkOutVsInputs refuses an --out that is or contains the folder of an
// input, or lies inside an input that is a folder: replacing it could
// delete the inputs.
func checkOutVsInputs(outAbs, out string, inputs []string) error {
	type input struct{ named, abs string }
	var local []input
	for _, in := range inputs {
		if in == "" || isRemote(in) {
			continue
		}
		if a, err := systemAbs(in); err == nil {
			local = append(local, input{in, a})
		}
	}
	holds := func(in string) error {
		return fault.BadInput(fmt.Errorf("--out %s holds the input %s; areasweep never writes where its inputs are, whatever --force says: choose another --out, e.g. %s",
			out, in, filepath.Join(filepath.Dir(outAbs), filepath.Base(outAbs)+"-results")))
	}
	for _, in := range local {
		a := in.abs
		switch {
		case within(filepath.Dir(a), outAbs):
			return holds(in.named)
		case outAbs == a:
			return fault.BadInput(fmt.Errorf("--out %s is the input file %s; name a folder for the results", out, in.named))
		case within(outAbs, a):
			return fault.BadInput(fmt.Errorf("--out %s lies inside the input %s; choose an --out outside it", out, in.named))
		}
	}
	// The paths as named (the folder resolved, not the file): a symbolic
	// link inside --out to an input elsewhere is the user's name of that
	// input, which --force would delete with an output of the same name
	// (results.json, scores.csv). After the files themselves, so that a
	// file in --out (a sidecar GDAL found beside the link) is named first.
	for _, in := range local {
		dir, err := systemAbs(filepath.Dir(in.named))
		if err != nil {
			continue
		}
		if named := filepath.Join(dir, filepath.Base(in.named)); within(filepath.Dir(named), outAbs) {
			return holds(in.named)
		}
	}
	return nil
}

// isRemote reports GDAL virtual paths and URLs, which are not local files.
func isRemote(p string) bool {
	return strings.HasPrefix(p, "/vsi") || strings.Contains(p, "://")
}

// makeParent creates the folders above --out that are missing and records
// them, so that a run refused later removes them again.
func (d *Dir) makeParent(out string) error {
	var missing []string
	for p := d.parent; ; p = filepath.Dir(p) {
		if _, err := os.Stat(p); err == nil {
			break
		}
		missing = append(missing, p)
		if filepath.Dir(p) == p {
			break
		}
	}
	if err := os.MkdirAll(d.parent, MkdirPerm()); err != nil {
		if DiskFull(err) {
			return cannotWrite(out, filepath.Dir(d.parent), err)
		}
		return fault.BadInput(fmt.Errorf("--out %s: cannot create %s (%w); choose a folder you can write to", out, d.parent, Cause(err)))
	}
	d.created = missing
	return nil
}

func (d *Dir) removeCreated() {
	for _, p := range d.created {
		os.Remove(p) // only removes empty folders
	}
}

// lockPath is the lock file beside --out.
func (d *Dir) lockPath() string { return filepath.Join(d.parent, "."+d.name+lockSuffix) }

// takeLock holds an exclusive flock on the lock file beside --out, and
// writes the owner's PID into it for the message a second run prints. The
// file is removed when the run ends; a run that locked a file another run
// had just removed sees that the path now names another file, and tries
// again.
// openLock is os.OpenFile for the lock file; tests replace it to meet a
// folder they cannot write to (they run as root too).
var openLock = os.OpenFile

func (d *Dir) takeLock(out string) error {
	for try := 0; ; try++ {
		f, err := openLock(d.lockPath(), os.O_RDWR|os.O_CREATE, 0o666&^Umask)
		if err != nil {
			return d.lockRefusal(out, d.parent, err)
		}
		if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
			owner, _ := os.ReadFile(d.lockPath())
			f.Close()
			who := "another areasweep run"
			if pid := strings.TrimSpace(string(owner)); pid != "" {
				who += " (process " + pid + ")"
			}
			return fault.BadInput(&InUseError{Out: out, Who: who})
		}
		if sameFile(f, d.lockPath()) || try == 10 {
			f.Truncate(0)
			f.WriteAt([]byte(strconv.Itoa(os.Getpid())+"\n"), 0)
			d.lock = f
			return nil
		}
		f.Close()
	}
}

// lockRefusal words err, met writing the lock file beside --out in the
// folder where (its parent, or the nearest one above it that exists).
func (d *Dir) lockRefusal(out, where string, err error) error {
	if st, serr := os.Stat(d.abs); serr == nil && st.IsDir() && !DiskFull(err) && access(d.abs, 2) == nil {
		// --out itself can be written (a folder made for you in one you
		// cannot write to): say why its parent matters.
		return fault.BadInput(fmt.Errorf("--out %s: cannot write the lock file %s beside it, in %s (%w); areasweep writes there to guard --out: give a folder inside it, such as %s, or one in a folder you can write to",
			out, filepath.Base(d.lockPath()), where, Cause(err), filepath.Join(d.Out, "run1")))
	}
	return cannotWrite(out, where, err)
}

// sameFile reports whether the open file f is still the file at path.
func sameFile(f *os.File, path string) bool {
	a, err1 := f.Stat()
	b, err2 := os.Stat(path)
	return err1 == nil && err2 == nil && os.SameFile(a, b)
}

// cleanDead removes staging folders of this --out left by runs that died
// (killed with SIGKILL at a scheduler's time limit, power cut). Holding
// the lock proves their owners are gone, on a file system whose locks
// hold across machines (a local disk, NFS, Lustre mounted with flock).
// A folder is removed only when it is provably areasweep's for this
// --out: it holds an owner record naming this --out (owner.go) whose
// process does not live on this machine (a second proof, for a file
// system whose locks are not kept), or it is empty. Any other folder of
// such a name (one of the user's, or an earlier version's staging folder
// without a record) is left as it is and listed in Kept. An owner record
// left in --out itself (the run died right after moving its stage onto
// --out) is removed too.
func (d *Dir) cleanDead(exists bool) {
	if exists {
		holds, _ := filepath.Glob(filepath.Join(globEscape(d.abs), holdPrefix+"*"))
		for _, p := range holds {
			if o, err := readOwner(p); err == nil && o.out == d.abs && !o.alive() {
				d.restoreHold(p)
			}
		}
	}
	var dead []string
	if m, _ := filepath.Glob(filepath.Join(d.parent, "."+globEscape(d.name)+oldStageMarker+"*")); m != nil {
		dead = append(dead, m...)
	}
	if exists {
		for _, p := range []string{stagePrefix, holdPrefix} {
			m, _ := filepath.Glob(filepath.Join(d.abs, p+"*"))
			dead = append(dead, m...)
		}
		if o, err := readOwner(d.abs); err == nil && o.out == d.abs && !o.alive() {
			os.Remove(filepath.Join(d.abs, OwnerName))
		}
	}
	if m, _ := filepath.Glob(filepath.Join(d.parent, "."+globEscape(d.name)+"."+stagePrefix[1:]+"*")); m != nil {
		dead = append(dead, m...)
	}
	for _, p := range dead {
		if st, err := os.Lstat(p); err != nil || !st.IsDir() {
			continue // not a folder: not ours
		}
		if os.Remove(p) == nil { // empty
			d.Cleaned++
			continue
		}
		o, err := readOwner(p)
		if err != nil || o.out != d.abs || o.alive() {
			d.Kept = append(d.Kept, p)
			continue
		}
		if os.RemoveAll(p) == nil {
			d.Cleaned++
		}
	}
}

// movingName is the journal a run writes into its set-aside folder once
// every old entry is in it, before it moves the new ones into --out: the
// staging folder's path, then the name of each entry it moves, a line
// each.
const movingName = ".areasweep-moving"

// readJournal reads the journal (movingName) in the set-aside folder
// hold: the staging folder it names and the entries it lists; ok is
// false when there is none.
func readJournal(hold string) (stage string, entries []string, ok bool) {
	b, err := os.ReadFile(filepath.Join(hold, movingName))
	if err != nil {
		return "", nil, false
	}
	lines := strings.Split(strings.TrimSuffix(string(b), "\n"), "\n")
	return lines[0], lines[1:], true
}

// restoreHold puts back into --out the previous outputs that a run killed
// while it replaced them (SIGKILL, a power cut) had set aside in hold, so
// that --out holds the previous run whole again rather than a mix, and
// the rerun does not delete them. When the kill came while it moved the
// new entries in (the journal is there), the ones it had moved (listed,
// and gone from its staging folder) are removed first: they are that
// run's; when it had moved them all, --out holds the new run whole and
// nothing is put back. When a name is taken in --out nothing is put back
// (see below).
func (d *Dir) restoreHold(hold string) {
	stage, listed, journal := readJournal(hold)
	if journal {
		if filepath.Dir(stage) != d.abs && filepath.Dir(stage) != d.parent {
			return // not a journal of this --out: the folder is removed as it was
		}
		var moved []string
		outputs := 0
		for _, n := range listed {
			if n == "" || n != filepath.Base(n) || n == "." || n == ".." || n == recordName {
				continue
			}
			outputs++
			if _, err := os.Lstat(filepath.Join(stage, n)); errors.Is(err, os.ErrNotExist) {
				moved = append(moved, n)
			}
		}
		if len(moved) == outputs {
			// Killed after its last move but the record's: --out holds
			// the new run whole, and its record goes in with it.
			if slices.Contains(listed, recordName) {
				os.Rename(filepath.Join(stage, recordName), filepath.Join(d.abs, recordName))
			}
			return
		}
		for _, n := range moved {
			os.RemoveAll(filepath.Join(d.abs, n))
		}
	}
	entries, err := os.ReadDir(hold)
	if err != nil {
		return
	}
	var names []string
	for _, e := range entries {
		n := e.Name()
		if n == OwnerName || n == movingName {
			continue
		}
		if _, err := os.Lstat(filepath.Join(d.abs, n)); !errors.Is(err, os.ErrNotExist) {
			// A name taken in --out: putting back the others would make
			// a mix. Without a journal (a run of an earlier version,
			// killed while it moved) the folder is removed as before;
			// with one, the name is a file made since: the folder is
			// kept, without its owner record, and named in run.log.
			if journal {
				os.Remove(filepath.Join(hold, OwnerName))
			}
			return
		}
		names = append(names, n)
	}
	for _, n := range names {
		if os.Rename(filepath.Join(hold, n), filepath.Join(d.abs, n)) != nil {
			os.Remove(filepath.Join(hold, OwnerName)) // kept, as above
		}
	}
}

func globEscape(s string) string {
	r := strings.NewReplacer(`\`, `\\`, `*`, `\*`, `?`, `\?`, `[`, `\[`)
	return r.Replace(s)
}

// Abort removes the staging folder and releases the lock; the previous
// content of --out is untouched. It is safe to call more than once and
// from the signal handler.
func (d *Dir) Abort() { d.abort() }

// abort is Abort, reporting whether it removed anything (false after
// Finish, which it waits for).
func (d *Dir) abort() bool {
	d.mu.Lock()
	defer d.mu.Unlock()
	if d.done {
		return false
	}
	d.done = true
	if d.Stage != "" {
		removeWritten(d.Stage)
	}
	d.release()
	return true
}

// removeWritten removes a staging folder that the run's writers may
// still be creating files in (a signal stops the run while it writes): a
// plain RemoveAll fails when a file appears after it listed the folder,
// and left the folder behind. It renames the folder first, so that the
// writers' next file by path fails, then removes it, again while files
// opened before the rename still arrive, and the folder itself should a
// writer make it again (os.MkdirAll of a subfolder).
func removeWritten(path string) {
	moved := path + "-removed"
	os.Rename(path, moved)
	for i := 0; i < 10; i++ {
		err := os.RemoveAll(moved)
		if err2 := os.RemoveAll(path); err == nil && err2 == nil {
			return
		}
		time.Sleep(10 * time.Millisecond)
	}
}

func (d *Dir) release() {
	if d.lock != nil {
		os.Remove(d.lockPath()) // while still holding the lock
		d.lock.Close()          // drops the flock
		d.lock = nil
	}
	d.removeCreated()
	active.mu.Lock()
	active.dirs = slices.DeleteFunc(active.dirs, func(x *Dir) bool { return x == d })
	active.mu.Unlock()
}

// AbortAll aborts every run in progress and removes every Staged folder
// (signal handler). It returns the folder into which the process last
// moved complete new outputs (a Dir's Finish or a Staged's that
// succeeded) when it had none left to abort, "" otherwise: a signal in a
// run's last moments, after that move, leaves the new outputs whole, not
// the old ones.
func AbortAll() (finished string) {
	active.mu.Lock()
	active.stopping = true
	dirs := append([]*Dir(nil), active.dirs...)
	active.mu.Unlock()
	aborted := false
	for _, d := range dirs {
		aborted = d.abort() || aborted
	}
	activeStaged.mu.Lock()
	staged := append([]*Staged(nil), activeStaged.list...)
	activeStaged.mu.Unlock()
	for _, s := range staged {
		s.mu.Lock()
		aborted = !s.done || aborted
		s.remove()
		s.mu.Unlock()
	}
	if aborted {
		return ""
	}
	if f := finishedOut.Load(); f != nil {
		return *f
	}
	return ""
}

// ResetStopping lets output folders be opened again after AbortAll, for
// tests that call it in the test process.
func ResetStopping() {
	active.mu.Lock()
	active.stopping = false
	active.mu.Unlock()
}

// finishedOut is the folder into which Finish last moved complete new
// outputs (see AbortAll).
var finishedOut atomic.Pointer[string]

// Finish moves the staged results into --out (see the comment at the
// top of this file) and releases the lock.
func (d *Dir) Finish() error {
	d.mu.Lock()
	defer d.mu.Unlock()
	if d.done {
		return errors.New("internal: output already finished")
	}
	d.done = true
	defer d.release()
	if err := d.writeRecord(); err != nil {
		os.RemoveAll(d.Stage)
		return moveFailed(d.Out, "cannot write in "+d.Out, err)
	}
	if filepath.Dir(d.Stage) == d.parent {
		if err := os.Rename(d.Stage, d.abs); err == nil {
			d.created = nil
			os.Remove(filepath.Join(d.abs, OwnerName))
			finishedOut.Store(&d.Out)
			return nil
		} else if _, serr := os.Stat(d.abs); serr != nil {
			os.RemoveAll(d.Stage)
			return moveFailed(d.Out, "cannot move the results into "+d.Out, err)
		}
		// --out appeared during the run: move the entries in one by one.
	}
	d.created = nil
	err := d.moveEntries()
	if err != nil {
		return err
	}
	os.Remove(filepath.Join(d.Stage, OwnerName))
	os.Remove(d.Stage)
	finishedOut.Store(&d.Out)
	return nil
}

// moveFailed words a failure to move the results into --out out, after
// which the run put back what it had moved (the results are gone with the
// staging folder): what failed, why, that out is as it was, and what to
// do.
func moveFailed(out, what string, err error) error {
	todo := "fix what stops files from being moved there (its permissions, or an immutable attribute: lsattr), then run again"
	if DiskFull(err) {
		todo = "free some space on that disk, then run again"
	}
	return fmt.Errorf("%s (%w); nothing in %s was changed: %s", what, Cause(err), out, todo)
}

// movedHook, set by tests, sees each entry moveEntries moved, in order.
var movedHook func(name string)

// replaced returns the entries of --out that moving the staged entries
// (named staged) replaces with --force: areasweep's outputs
// (outputNames, and the demo's inputs/), or a shard's own files.
func (d *Dir) replaced(staged []string) []string {
	switch {
	case d.Shard:
		return staged
	case d.Demo:
		return append(slices.Clip(outputNames), "inputs")
	}
	return outputNames
}

// moveEntries moves each staged entry into --out. Without --force an
// entry whose name already exists stops everything before any move, and
// the results are kept in a visible folder beside --out. With --force the
// existing areasweep entries are first set aside (and put back if a move
// fails), then deleted.
func (d *Dir) moveEntries() error {
	staged, err := os.ReadDir(d.Stage)
	if err != nil {
		return fmt.Errorf("cannot read the staged results %s: %w", d.Stage, Cause(err))
	}
	// The owner record stays in the stage; areasweep's own records (a
	// batch's completion marker) go last, so that a run killed while it
	// moves never leaves one beside half-moved outputs.
	staged = slices.DeleteFunc(staged, func(e os.DirEntry) bool { return e.Name() == OwnerName })
	sort.SliceStable(staged, func(i, j int) bool {
		return !strings.HasPrefix(staged[i].Name(), recordPrefix) && strings.HasPrefix(staged[j].Name(), recordPrefix)
	})
	names := map[string]bool{}
	for _, e := range staged {
		names[e.Name()] = true
	}
	var clash []string
	for n := range names {
		if n == recordName {
			continue // the record of --out, which the staged one extends
		}
		if _, err := os.Lstat(filepath.Join(d.abs, n)); err == nil {
			clash = append(clash, n)
		}
	}
	sort.Strings(clash)
	if len(clash) > 0 && !d.force {
		keep := d.abs + ".results-" + strconv.Itoa(os.Getpid())
		os.Remove(filepath.Join(d.Stage, OwnerName)) // a visible folder of results, the user's now
		if err := os.Rename(d.Stage, keep); err != nil {
			keep = d.Stage
		}
		return fmt.Errorf("%s gained %s during the run and --force was not given, so nothing in it was replaced; the results are in %s",
			d.Out, strings.Join(clash, ", "), keep)
	}
	stagedNames := make([]string, len(staged))
	for i, e := range staged {
		stagedNames[i] = e.Name()
	}
	replace := d.replaced(stagedNames)
	// A file of the user's that reached a folder replaced as a whole
	// during the run, or a folder of the user's where a file goes (a
	// shard's own files were checked at the start too): nothing is
	// replaced, as for a clash.
	var inWay error
	if found := d.foreign(replace, d.Stage); len(found) > 0 {
		inWay = foreignError(d.Out, found)
	} else if f := d.folderAtFile(replace); f != "" {
		inWay = folderAtFileError(d.Out, f)
	} else if found := d.unrecorded(replace); len(found) > 0 {
		inWay = unrecordedError(d.Out, found)
	}
	if inWay != nil {
		keep := d.abs + ".results-" + strconv.Itoa(os.Getpid())
		os.Remove(filepath.Join(d.Stage, OwnerName)) // a visible folder of results, the user's now
		if err := os.Rename(d.Stage, keep); err != nil {
			keep = d.Stage
		}
		return fmt.Errorf("%s, so nothing in it was replaced; the results are in %s", inWay, keep)
	}
	hold, err := os.MkdirTemp(d.abs, holdPrefix)
	if err == nil {
		err = writeOwner(hold, d.abs)
	}
	if err != nil {
		if hold != "" {
			os.RemoveAll(hold)
		}
		os.RemoveAll(d.Stage)
		return moveFailed(d.Out, "cannot write in "+d.Out, err)
	}
	var setAside, moved []string
	undo := func() {
		for _, n := range moved {
			os.Rename(filepath.Join(d.abs, n), filepath.Join(d.Stage, n))
		}
		for _, n := range setAside {
			os.Rename(filepath.Join(hold, n), filepath.Join(d.abs, n))
		}
		os.RemoveAll(hold)
		os.RemoveAll(d.Stage)
	}
	for _, n := range replace {
		if _, err := os.Lstat(filepath.Join(d.abs, n)); err != nil {
			continue
		}
		if err := os.Rename(filepath.Join(d.abs, n), filepath.Join(hold, n)); err != nil {
			undo()
			return moveFailed(d.Out, "cannot replace "+filepath.Join(d.Out, n), err)
		}
		setAside = append(setAside, n)
	}
	// The journal: from here on what --out holds of these names is new,
	// so a run that finds this set-aside folder of a killed run can put
	// the old entries back (restoreHold).
	journal := d.Stage + "\n"
	for _, e := range staged {
		journal += e.Name() + "\n"
	}
	if err := writeFile(filepath.Join(hold, movingName), []byte(journal), 0o666&^Umask); err != nil {
		undo()
		return moveFailed(d.Out, "cannot write in "+d.Out, err)
	}
	for _, e := range staged {
		n := e.Name()
		if err := os.Rename(filepath.Join(d.Stage, n), filepath.Join(d.abs, n)); err != nil {
			undo()
			return moveFailed(d.Out, "cannot move "+n+" into "+d.Out, err)
		}
		moved = append(moved, n)
		if movedHook != nil {
			movedHook(n)
		}
	}
	os.RemoveAll(hold)
	return nil
}

// Staged is a folder of files written before they are moved into a folder
// that is not a run's --out (the report command writes the report of DIR
// into one inside DIR, then moves its files into place). AbortAll removes
// it; a signal that arrives while Finish moves the files waits for the
// moves, so the folder is left with the old files or with the new ones,
// never with temporary files.
type Staged struct {
	Path string
	mu   sync.Mutex
	done bool
}

// stagedPrefix names the staging folders of Stage (hidden, owner's PID).
const stagedPrefix = ".areasweep-staged-"

var activeStaged struct {
	mu   sync.Mutex
	list []*Staged
}

// Stage makes a staging folder inside dir, removed by AbortAll. It first
// removes the staging folders in dir of processes that no longer run
// (killed with SIGKILL, power cut), and only those provably so: a folder
// holding an owner record (owner.go) for dir, written on this machine by
// a process that no longer runs here. No lock guards dir, so a folder of
// another machine (dir on shared storage, where another report may be
// running), one without a record (the user's, an earlier version's, or
// one made a moment ago whose record is not yet written) or one whose
// process lives is left alone.
func Stage(dir string) (*Staged, error) {
	abs := dir
	if a, err := systemAbs(dir); err == nil {
		abs = a
	}
	host, _ := os.Hostname()
	if m, _ := filepath.Glob(filepath.Join(globEscape(dir), stagedPrefix+"*")); m != nil {
		for _, p := range m {
			if st, err := os.Lstat(p); err != nil || !st.IsDir() {
				continue
			}
			if o, err := readOwner(p); err == nil && o.out == abs && o.host == host && !o.alive() {
				os.RemoveAll(p)
			}
		}
	}
	// Registered and held before the folder is made, so that a signal
	// (AbortAll) waits for it and removes it, or comes first and stops
	// it being made.
	s := &Staged{}
	s.mu.Lock()
	defer s.mu.Unlock()
	active.mu.Lock() // held while s is listed: AbortAll lists it, or stopped first
	if active.stopping {
		active.mu.Unlock()
		s.done = true
		return nil, errStopping
	}
	activeStaged.mu.Lock()
	activeStaged.list = append(activeStaged.list, s)
	activeStaged.mu.Unlock()
	active.mu.Unlock()
	p, err := os.MkdirTemp(dir, stagedPrefix+strconv.Itoa(os.Getpid())+"-")
	if err == nil {
		s.Path = p
		err = writeOwner(p, abs)
	}
	if err != nil {
		s.remove()
		return nil, err
	}
	return s, nil
}

// Finish runs move (which moves the staged files into place) without
// letting AbortAll interrupt it, then removes the staging folder.
func (s *Staged) Finish(move func() error) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.done {
		return errors.New("internal: staged files already finished")
	}
	err := move()
	s.remove()
	if err == nil {
		dir := filepath.Dir(s.Path)
		finishedOut.Store(&dir)
	}
	return err
}

// Abort removes the staging folder; safe to call more than once.
func (s *Staged) Abort() {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.remove()
}

func (s *Staged) remove() {
	if s.done {
		return
	}
	s.done = true
	if s.Path != "" {
		removeWritten(s.Path)
	}
	activeStaged.mu.Lock()
	activeStaged.list = slices.DeleteFunc(activeStaged.list, func(x *Staged) bool { return x == s })
	activeStaged.mu.Unlock()
}
