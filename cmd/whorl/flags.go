package main

import (
	"flag"
	"strings"

	"whorl/units"
)

// Flags are defined in a command's setFlags with fs.Bool, fs.String, ...,
// fs.Var(&stringList{}, ...) and read back in run with the helpers below,
// so that no state is shared between runs of the same command.

// stringList is a repeatable string flag: each use appends a value.
type stringList []string

func (s *stringList) String() string { return strings.Join(*s, ",") }
func (s *stringList) Set(v string) error {
	*s = append(*s, v)
	return nil
}
func (s *stringList) Get() any { return []string(*s) }

func flagValue(fs *flag.FlagSet, name string) any {
	f := fs.Lookup(name)
	if f == nil {
		panic("whorl: flag " + name + " is not defined")
	}
	g, ok := f.Value.(flag.Getter)
	if !ok {
		panic("whorl: flag " + name + " has no Get method")
	}
	return g.Get()
}

func flagBool(fs *flag.FlagSet, name string) bool        { return flagValue(fs, name).(bool) }
func flagString(fs *flag.FlagSet, name string) string    { return flagValue(fs, name).(string) }
func flagInt(fs *flag.FlagSet, name string) int          { return flagValue(fs, name).(int) }
func flagFloat(fs *flag.FlagSet, name string) float64    { return flagValue(fs, name).(float64) }
func flagStrings(fs *flag.FlagSet, name string) []string { return flagValue(fs, name).([]string) }

// flagSet reports whether the flag was given on the command line.
func flagSet(fs *flag.FlagSet, name string) bool {
	set := false
	fs.Visit(func(f *flag.Flag) {
		if f.Name == name {
			set = true
		}
	})
	return set
}

// flagQuantity parses a string flag holding a value with an optional unit
// suffix (see package units) and returns it in SI. An empty flag gives
// (0, false, nil).
func flagQuantity(fs *flag.FlagSet, name string, k units.Kind) (float64, bool, error) {
	s := flagString(fs, name)
	if s == "" {
		return 0, false, nil
	}
	v, err := units.Parse(k, s)
	if err != nil {
		return 0, true, usagef("--%s %v", name, err)
	}
	return v, true, nil
}
