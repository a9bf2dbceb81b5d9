package geodesy_test

import (
	"fmt"

	"areasweep/extent/geodesy"
)

// The JFK to Singapore Changi example of PROJ's geodesic.h (the printed
// values agree with `geod -I +ellps=WGS84`).
func ExampleInverse() {
	s12, azi1, azi2 := geodesy.Inverse(40.64, -73.78, 1.36, 103.99)
	fmt.Printf("%.3f km, azi1 %.4f, azi2 %.4f\n", s12/1000, azi1, azi2)
	// Output: 15347.513 km, azi1 3.3058, azi2 177.4878
}

// The printed areas agree with the closed form evaluated independently in
// Python.
func ExampleCellArea() {
	// A 1 x 1 degree cell at the equator and one at 60 N.
	fmt.Printf("%.2f km2\n", geodesy.CellArea(0, 1, 1)/1e6)
	fmt.Printf("%.2f km2\n", geodesy.CellArea(60, 61, 1)/1e6)
	// Output:
	// 12308.46 km2
	// 6123.14 km2
}

func ExampleIndex_Nearest() {
	// Three sites: Berlin, Paris, Madrid. Frankfurt-Berlin is 424.424 km by
	// `geod -I +ellps=WGS84`.
	ix, err := geodesy.NewIndex([]float64{52.52, 48.8566, 40.4168}, []float64{13.405, 2.3522, -3.7038})
	if err != nil {
		fmt.Println(err)
		return
	}
	i, d := ix.Nearest(50.1109, 8.6821, 0) // Frankfurt
	fmt.Printf("site %d at %.1f km\n", i, d/1000)
	i, d = ix.Nearest(50.1109, 8.6821, 100e3) // nothing within 100 km
	fmt.Println(i, d)
	// Output:
	// site 0 at 424.4 km
	// -1 +Inf
}
