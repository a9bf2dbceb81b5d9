package extent

import "testing"

// TestSameCRSWrittenDifferently: models on one grid whose CRSs are
// written differently (an ASCII grid's ESRI .prj beside a GeoTIFF's
// EPSG code) are one grid; a CRS that puts the cells elsewhere (another
// datum, another projection centre) is not.
func TestSameCRSWrittenDifferently(t *testing.T) {
	const (
		esriWGS84 = `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["Degree",0.0174532925199433],AXIS["Longitude",EAST],AXIS["Latitude",NORTH]]`
		esriLAEA  = `PROJCS["ETRS89_LAEA",GEOGCS["GCS_ETRS_1989",DATUM["D_ETRS_1989",SPHEROID["GRS_1980",6378137.0,298.257222101]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]],PROJECTION["Lambert_Azimuthal_Equal_Area"],PARAMETER["False_Easting",4321000.0],PARAMETER["False_Northing",3210000.0],PARAMETER["Central_Meridian",10.0],PARAMETER["Latitude_Of_Origin",52.0],UNIT["Meter",1.0]]`
		otherLAEA = `PROJCS["LAEA moved",GEOGCS["GCS_ETRS_1989",DATUM["D_ETRS_1989",SPHEROID["GRS_1980",6378137.0,298.257222101]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]],PROJECTION["Lambert_Azimuthal_Equal_Area"],PARAMETER["False_Easting",4321000.0],PARAMETER["False_Northing",3210000.0],PARAMETER["Central_Meridian",11.0],PARAMETER["Latitude_Of_Origin",52.0],UNIT["Meter",1.0]]`
	)
	geo := [6]float64{-150, 0.1, 0, -28, 0, -0.1}
	east := [6]float64{170, 0.5, 0, 60, 0, -0.5} // runs past 180
	laea := [6]float64{4000000, 1000, 0, 3000000, 0, -1000}
	cases := []struct {
		name string
		gt   [6]float64
		a, b string
		same bool
	}{
		{"EPSG:4326 and an ESRI WGS84", geo, "EPSG:4326", esriWGS84, true},
		{"ESRI WGS84 east of 180", east, esriWGS84, "EPSG:4326", true},
		{"EPSG:3035 and an ESRI LAEA Europe", laea, "EPSG:3035", esriLAEA, true},
		{"WGS84 and ED50", geo, "EPSG:4326", "EPSG:4230", false},
		{"WGS84 and NAD27", [6]float64{-100, 0.1, 0, 45, 0, -0.1}, "EPSG:4326", "EPSG:4267", false},
		{"LAEA about another meridian", laea, "EPSG:3035", otherLAEA, false},
		{"geographic and projected", geo, "EPSG:4326", "EPSG:3857", false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a, err := NewGrid(40, 30, c.gt, c.a)
			if err != nil {
				t.Fatal(err)
			}
			defer a.Close()
			b, err := NewGrid(40, 30, c.gt, c.b)
			if err != nil {
				t.Fatal(err)
			}
			defer b.Close()
			if d := a.SameAs(b); (d == "") != c.same {
				t.Errorf("SameAs = %q, want same = %v", d, c.same)
			}
		})
	}
}
