// Package units converts quantities between the SI base units Whorl uses
// inside the program and the units people type and read: millimetres and
// inches, kilohertz, %IACS, millivolts, degrees.
//
// Conventions: every value returned by a Parse function is in SI base units
// (m, Hz, S/m, V, s, m/s, rad). A bare number without a unit suffix is taken
// as already being SI. Exact definitions: 1 in = 25.4 mm (international yard
// and pound agreement, 1959); 100 %IACS = 58.0 MS/m at 20 °C (IEC 1913,
// ASTM E1004).
package units
