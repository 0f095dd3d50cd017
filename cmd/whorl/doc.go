// Command whorl is Whorl's command line: eddy-current signal analysis for
// heat-exchanger tubing and conductive parts, from scan files to a
// traceable inspection record and report.
//
// Usage:
//
//	whorl COMMAND [flags] [args]
//
// The main job:
//
//	demo                   the whole inspection on invented demo data:
//	                       generate, calibrate, analyse, record, report
//	inspect                the same on a folder of your own scans, with a
//	                       procedure and a reference standard; resumable
//
// Scan files and signals:
//
//	scan info, scan convert  read Whorl CSV, raw coil-voltage CSV and foreign
//	                       CSV through a column map (docs/csv-format.md,
//	                       docs/column-map.md)
//	demod                  digital lock-in demodulation of raw coil voltage
//	process                apply a processing chain (docs/processing-chain.md)
//	mix train, mix apply   multi-frequency mixes
//	spectrum               Welch noise spectra
//
// Calibration and analysis:
//
//	calibrate              set-up and depth curves from a standard scan;
//	                       closing check of a calibration group
//	calibrate approve      Level III approval (a new version)
//	analyze                detect, measure, size and classify indications
//
// Coil model and material set-ups:
//
//	model plate, model tube, model depth-profile, model diagram
//	conductivity calibrate, conductivity measure
//	coating calibrate, coating measure
//	advise                 skin depth, f90, frequency set, acquisition checks
//
// Records and reports:
//
//	records list, show, history, verify
//	report                 PDF report, CSV and JSON exports, QA release
//	gui                    the desktop workstation
//	synth                  write an invented inspection (demo data only)
//
// Every command has --help with its flags and examples; commands whose
// output is data take --json. Values with units accept suffixes (mm, um,
// in; Hz, kHz, MHz; S/m, MS/m, %IACS; V, mV); a bare number is SI.
//
// Exit codes:
//
//	0    success
//	1    unexpected failure (I/O, internal error)
//	2    bad command line: unknown command, flag or value
//	3    bad input data: malformed, truncated or impossible file or
//	     parameter; for whorl inspect, some scans were not examined
//	4    a check failed: record verification, calibration-group check,
//	     accuracy target
//	5    the record refused the action for the declared role
//	130  interrupted
//
// Environment:
//
//	WHORL_USER         the person at this workstation (records, audit trail)
//	WHORL_ROLE         their role: level1, level2, level3 or qa
//	WHORL_CERT_EXPIRY  last day their certificate is valid (YYYY-MM-DD)
//
// Caution: results inform decisions on pressure equipment and aircraft.
// They must be reviewed by qualified, certified personnel under a written
// procedure; the governing code, local regulations and licensed practice
// take precedence.
package main
