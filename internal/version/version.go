// Package version reports the Whorl build's version, which every record
// and report carries.
package version

import "runtime/debug"

// Name is the software name written into records and reports.
const Name = "Whorl"

// String returns the program version: the module version when built from
// a tagged module, else the VCS revision (with "+dirty" for a modified
// tree), else "devel".
func String() string {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return "devel"
	}
	if v := bi.Main.Version; v != "" && v != "(devel)" {
		return v
	}
	rev, dirty := "", false
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			dirty = s.Value == "true"
		}
	}
	if rev == "" {
		return "devel"
	}
	if len(rev) > 12 {
		rev = rev[:12]
	}
	if dirty {
		rev += "+dirty"
	}
	return "devel-" + rev
}
