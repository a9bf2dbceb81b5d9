package outdir

import (
	"bufio"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// recordName is the record a run leaves in --out of the entries
// areasweep wrote there: one name per line after a header, the names of
// every run into that folder so far (a shard adds its own files to those
// of the shards before it). --force replaces an output entry only when
// the record lists it: a scores.csv or run.log of the user's in a folder
// no run wrote into is never areasweep's to replace. It is one of
// areasweep's own records (recordPrefix), moved into --out after the
// outputs, so a run killed while it moves leaves the record before it.
const recordName = recordPrefix + "written"

// recordHeader is the record's first line, which says what it is to a
// user who finds it; a file without it vouches for nothing.
const recordHeader = "# entries of this folder written by areasweep; --force replaces these and nothing else"

// readRecord returns the names the record in dir lists, or nil when
// there is none or it is not one (no header, a folder, unreadable).
func readRecord(dir string) map[string]bool {
	f, err := os.Open(filepath.Join(dir, recordName))
	if err != nil {
		return nil
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	if !sc.Scan() || sc.Text() != recordHeader {
		return nil
	}
	names := map[string]bool{}
	for sc.Scan() {
		if n := sc.Text(); n != "" {
			names[n] = true
		}
	}
	if sc.Err() != nil {
		return nil
	}
	return names
}

// writeRecord writes the record of --out into the staging folder, as
// --out will be once the staged entries are moved in: the entries staged
// (not areasweep's own records, nor the owner record), and those the
// record in --out lists that this run leaves in place (not among the
// names it replaces, and still there): a shard's run keeps the other
// shards' files listed, a run's --force removes what it does not write
// again.
func (d *Dir) writeRecord() error {
	staged, err := os.ReadDir(d.Stage)
	if err != nil {
		return err
	}
	names := map[string]bool{}
	var stagedNames []string
	for _, e := range staged {
		if !strings.HasPrefix(e.Name(), recordPrefix) {
			names[e.Name()] = true
			stagedNames = append(stagedNames, e.Name())
		}
	}
	replaced := d.replaced(stagedNames)
	for n := range readRecord(d.abs) {
		if slices.Contains(replaced, n) {
			continue
		}
		if _, err := os.Lstat(filepath.Join(d.abs, n)); err == nil {
			names[n] = true
		}
	}
	list := make([]string, 0, len(names))
	for n := range names {
		list = append(list, n)
	}
	slices.Sort(list)
	body := recordHeader + "\n" + strings.Join(list, "\n") + "\n"
	return writeFile(filepath.Join(d.Stage, recordName), []byte(body), 0o666&^Umask)
}

// unrecorded returns, as paths under --out, the entries among names that
// --out holds and its record does not list: files (or folders, links)
// that no areasweep run wrote there, which --force must not replace.
//
// The entries a run killed while it moved its results in (SIGKILL) had
// listed in its journal count as recorded: they are that run's, and
// opening --out puts the previous ones back or keeps them (restoreHold)
// once the lock is held.
func (d *Dir) unrecorded(names []string) []string {
	rec := readRecord(d.abs)
	if rec == nil {
		rec = map[string]bool{}
	}
	holds, _ := filepath.Glob(filepath.Join(globEscape(d.abs), holdPrefix+"*"))
	for _, h := range holds {
		if _, entries, ok := readJournal(h); ok {
			for _, n := range entries {
				rec[n] = true
			}
		}
	}
	var found []string
	for _, n := range names {
		if strings.HasPrefix(n, recordPrefix) || rec[n] {
			continue
		}
		if _, err := os.Lstat(filepath.Join(d.abs, n)); err == nil {
			found = append(found, filepath.Join(d.Out, n))
		}
	}
	return found
}

// unrecordedError is the refusal of the entries unrecorded found.
func unrecordedError(out string, found []string) error {
	return fmt.Errorf("--out %s holds %s, which no areasweep run wrote there (its record of what runs wrote, %s, does not list them), and --force replaces only what areasweep wrote; "+
		"move them out of %s (or remove them yourself if they are an earlier run's), or choose another --out", out, firstThree(found), recordName, out)
}

// firstThree lists up to three of paths, then how many more there are.
func firstThree(paths []string) string {
	if len(paths) > 3 {
		return fmt.Sprintf("%s and %d more", strings.Join(paths[:3], ", "), len(paths)-3)
	}
	return strings.Join(paths, ", ")
}
