//go:build tools

// Package tools pins the module's chosen dependencies before every package
// uses them.
package tools

import (
	_ "github.com/airbusgeo/godal"
	_ "github.com/paulmach/orb"
	_ "github.com/schollz/progressbar/v3"
	_ "github.com/spf13/cobra"
	_ "go.yaml.in/yaml/v3"
	_ "gonum.org/v1/gonum/stat"
	_ "gonum.org/v1/plot"
)
