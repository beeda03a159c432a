package disciplines

import _ "embed"

// swiftletPolars is the text of swiftlet_polars_invented.csv.
//
//go:embed swiftlet_polars_invented.csv
var swiftletPolars string

// SwiftletInventedPolars returns the invented "measured" polar data of the
// demonstration business jet Swiftlet S12, as the CSV text that
// mdo.ReadMeasurements reads: the wing-body lift slope aero.cla_cruise, the
// zero-lift drag aero.cd0_cruise and the drag-due-to-lift factor
// aero.k_cruise of the parabolic polar CD = CD0 + K·CL², at several Mach
// numbers and altitudes, with their standard uncertainties. The numbers
// are INVENTED: the model itself made them, with calibration factors away
// from 1 and seeded noise (optimizers' TestCalibrationExampleData writes
// the file and says how), to demonstrate a calibration; they are no
// measurement of any aircraft.
func SwiftletInventedPolars() string { return swiftletPolars }
