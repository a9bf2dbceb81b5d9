// Command areasweep rescores a species distribution model on a family of
// alternative extents and reports how much of each score comes from the
// extent rather than the model.
package main

import "os"

func main() { os.Exit(Main(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)) }
