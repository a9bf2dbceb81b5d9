package batchrun

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/pipeline"
	"areasweep/metrics"
	"areasweep/report"
)

// studyState is what is known of one study before the batch runs it.
type studyState int

const (
	statePending studyState = iota // to run
	stateDone                      // finished earlier (marker): skipped
	stateStale                     // finished earlier from other settings or inputs
)

// staleness says why a study or shard is stale and what to do.
type staleness struct {
	// why completes "<folder> was made ...".
	why string
	// remedy is the way out besides --force.
	remedy string
}

// state reads a study folder's marker (see markerState).
func (st *study) state() (studyState, staleness, error) {
	return st.markerState(st.dir)
}

// markerState reads the marker in dir, the folder of the study or of one
// of its shards: none, pending; another settings checksum (the table row
// changed), stale; no settings checksum at all (an empty or damaged
// marker), stale too; an input file recorded in it removed or holding other
// content than when the study finished (batch.Checker: only files whose
// size or time changed are hashed), stale too; else done. A marker
// without input lines (an older areasweep's) is done when its settings
// match, as before. When some input was only touched (same content), the
// marker is rewritten with the files' new times, best effort, so that the
// next re-run needs no hashing.
func (st *study) markerState(dir string) (studyState, staleness, error) {
	m, err := batch.ReadMarker(dir)
	switch {
	case err != nil:
		return statePending, staleness{}, err
	case m == nil:
		return statePending, staleness{}, nil
	case m["settings"] == "":
		// Every marker areasweep writes (batch's, a shard task's, an
		// older version's) records the settings checksum: one without it
		// is empty or damaged and vouches for nothing in the folder.
		return stateStale, staleness{"by a run its completion marker " + batch.MarkerPath(dir) + " does not tell (the marker is empty or damaged: it records no settings)", "remove the folder"}, nil
	case m["settings"] != st.settings:
		why := "the table row changed since it finished"
		if d := settingsDiff(m[markerValues], st.canonical); d != "" {
			why += ": " + d
		}
		return stateStale, staleness{"from other settings (" + why + ")", "remove the folder"}, nil
	}
	files, err := m.Inputs()
	if err != nil {
		return stateStale, staleness{fmt.Sprintf("from inputs its completion marker does not tell (%s)", fault.UserText(err)), "remove the folder"}, nil
	}
	c, err := st.inputs.Check(files)
	if err != nil {
		return statePending, staleness{}, err
	}
	c.Changed = append(c.Changed, addedSidecars(files)...)
	if len(c.Changed) > 0 {
		var what []string
		for i, ch := range c.Changed {
			if i == 3 {
				what = append(what, fmt.Sprintf("and %d more", len(c.Changed)-i))
				break
			}
			what = append(what, ch.String())
		}
		remedy := "restore the file"
		if len(c.Changed) > 1 {
			remedy = "restore the files"
		}
		if c.Changed[0].Added {
			remedy = "remove the file again"
		}
		return stateStale, staleness{"from other inputs (since it finished, " + strings.Join(what, "; ") + ")", remedy}, nil
	}
	if want := m["results"]; want != "" {
		// The study's results.json as it finished (the marker records
		// its checksum): another run that wrote into the folder (run
		// --out DIR/ID --force) left the marker, and the summary would
		// take that run's results for the study's. A removed file is
		// the summary's to tell (the same command skips the study).
		// A file that no longer reads as results is the summary's to
		// word (what is wrong in it, and how to restore it).
		res := filepath.Join(dir, "results.json")
		got, err := batch.FileSHA256(res)
		if err == nil && got != want {
			if _, lerr := report.LoadWritten(res, ""); lerr == nil {
				return stateStale, staleness{"by a run whose results.json has changed since it finished (another run wrote into the folder, or the file was edited)", "remove the folder"}, nil
			}
		}
	}
	if c.Refreshed != nil {
		m.SetInputs(c.Refreshed)
		batch.WriteMarker(dir, m) // best effort: without it the next check hashes the file again
	}
	return stateDone, staleness{}, nil
}

// addedSidecars lists the files that inputs.Sidecars finds now beside a
// recorded input and that the marker does not record: put there since
// the study ran (a .prj beside a shapefile changes its coordinates). The
// first file recorded for a role is the input itself (pipeline.IO.Inputs
// gives each input before its sidecars); the occurrence table has none.
// A few stat calls per input; the files GDAL lists itself (a virtual
// raster's sources) are recorded and checked, but a new one is not looked
// for (that would open every dataset).
func addedSidecars(files []batch.InputFile) []batch.InputChange {
	recorded := map[string]bool{}
	for _, f := range files {
		recorded[filepath.Clean(f.Path)] = true
	}
	var added []batch.InputChange
	seen := map[string]bool{}
	for _, f := range files {
		if seen[f.Role] {
			continue
		}
		seen[f.Role] = true
		kind := inputs.VectorSidecars
		switch {
		case f.Role == "occurrences":
			continue
		case strings.HasPrefix(f.Role, "model:") || strings.HasPrefix(f.Role, "null:"):
			kind = inputs.RasterSidecars
		}
		for _, p := range inputs.Sidecars(f.Path, kind) {
			if !recorded[filepath.Clean(p)] {
				added = append(added, batch.InputChange{File: batch.InputFile{Role: f.Role, Path: p}, Added: true})
			}
		}
	}
	return added
}

// markerInputs converts the files a run hashed into the marker's records,
// their paths made absolute (a sidecar's path may be relative as GDAL
// gave it; the next check may run from another folder).
func markerInputs(files []pipeline.InputFile) []batch.InputFile {
	out := make([]batch.InputFile, len(files))
	for i, f := range files {
		out[i] = batch.InputFile{Role: f.Role, Path: f.Path, Size: f.Size, ModTime: f.ModTime, SHA256: f.SHA256}
		if a, err := filepath.Abs(f.Path); err == nil {
			out[i].Path = a
		}
	}
	return out
}

// shardState reads the marker of shard k of n of st (see markerState). A
// shard's folder is the batch's own: a stale shard runs again without
// --force. A shard whose marker says done but whose partial file is
// missing or damaged (removed, cut short or changed since) is stale too:
// the merge would refuse it on every re-run. So is one written by another
// areasweep build (the same executable rebuilt, or another one, since it
// ran), which the merge refuses too.
func shardState(o *Options, st *study, k, n int) (studyState, staleness, error) {
	dir := shardDir(o.Out, st.id, k)
	s, why, err := st.markerState(dir)
	if err != nil || s != stateDone {
		return s, why, err
	}
	f := filepath.Join(dir, pipeline.ShardFileName(k, n))
	data, err := os.ReadFile(f)
	var part *metrics.PartialFile
	if err == nil {
		part, err = metrics.DecodePartial(data, f)
	} else if errors.Is(err, fs.ErrNotExist) {
		err = fmt.Errorf("%s was removed", f)
	}
	if err != nil {
		return stateStale, staleness{"by a run whose partial file is missing or damaged since (" + fault.UserText(err) + ")", "remove the folder"}, nil
	}
	if tool := pipeline.ToolID(o.Version, o.Build); part.Header.Tool != tool {
		return stateStale, staleness{fmt.Sprintf("by areasweep %s, and this is %s", part.Header.Tool, tool), "remove the folder"}, nil
	}
	return stateDone, staleness{}, nil
}
