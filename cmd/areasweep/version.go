package main

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"runtime"
	"sync"

	"github.com/spf13/cobra"
)

// versionLine is what 'areasweep version' and 'areasweep --version' print.
func versionLine() string {
	return fmt.Sprintf("areasweep %s (%s, %s/%s)", version, runtime.Version(), runtime.GOOS, runtime.GOARCH)
}

// buildID names this build of areasweep beyond its version number: the
// first 12 hex digits of the SHA-256 of its executable. A shard records
// it, and a merge refuses the shards of another build: two builds of one
// version number (two commits of a development version, or one rebuilt
// while a job array waited in the queue) can sum the grid differently.
// The revision Go may record in the executable is not enough: builds
// without version control information (GOFLAGS=-buildvcs=false, a source
// archive) and builds with uncommitted changes carry none that differs.
// Hashing the 28 MB executable takes about 0.1 s, once per process; when
// it cannot be read the Go version stands in.
var buildID = sync.OnceValue(func() string {
	if id, err := executableID(); err == nil {
		return id
	}
	return runtime.Version()
})

// executableID is "build " and the first 12 hex digits of the SHA-256 of
// the running executable. On Linux /proc/self/exe is the file this process
// runs even when a rebuild has replaced the one at its path since; the
// path is the fallback elsewhere.
func executableID() (string, error) {
	f, err := os.Open("/proc/self/exe")
	if err != nil {
		exe, xerr := os.Executable()
		if xerr != nil {
			return "", xerr
		}
		if f, err = os.Open(exe); err != nil {
			return "", err
		}
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", err
	}
	return "build " + hex.EncodeToString(h.Sum(nil))[:12], nil
}

func newVersionCmd(streams *IO) *cobra.Command {
	return &cobra.Command{
		Use:     "version",
		Short:   "Print the version",
		Example: "  areasweep version\n  areasweep --version",
		Args:    cobra.NoArgs,
		RunE: func(c *cobra.Command, args []string) error {
			_, err := fmt.Fprintln(streams.Out, versionLine())
			return err
		},
	}
}
