package main

import "areasweep/cmd/internal/batchrun"

// batchMarker is the folder of the batch's own files inside --out, as the
// batch tests name it.
const batchMarker = batchrun.OwnDir
