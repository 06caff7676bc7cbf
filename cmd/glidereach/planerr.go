package main

import (
	"errors"
	"strings"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/plan"
)

// planFlags names the flag of a plan request field where it is not the
// field's name in kebab case ("AirSink" → "--air-sink").
var planFlags = map[string]string{
	"MacCready": "--mc",
}

// flagOf returns the command-line flag of plan request field f: "From" →
// "--from", "AltIndicated" → "--alt-indicated"; "" for "".
func flagOf(f string) string {
	if f == "" {
		return ""
	}
	if fl, ok := planFlags[f]; ok {
		return fl
	}
	var b strings.Builder
	b.WriteString("--")
	for i, r := range f {
		if r >= 'A' && r <= 'Z' {
			if i > 0 {
				b.WriteByte('-')
			}
			r += 'a' - 'A'
		}
		b.WriteRune(r)
	}
	return b.String()
}

// usage turns an error of the plan package that the request caused
// (*plan.InputError, at the top of err) into the command's
// *input.UsageError naming the flag, so that it exits with status 2 and
// says which flag is wrong in the words it always has; other errors are
// returned as they are.
func usage(err error) error {
	var ie *plan.InputError
	if err != nil && errors.As(err, &ie) && err == error(ie) {
		return &input.UsageError{Where: flagOf(ie.Field), Err: ie.Err}
	}
	return err
}
