package input

import "fmt"

// UsageError is an error the user caused: a bad flag value, a bad file, a
// missing input. The command line maps it to exit status 2. Where names the
// flag, file or line; Err says what is wrong.
type UsageError struct {
	Where string // flag ("--alt"), file ("fields.geojson") or file:line; may be empty
	Err   error
}

func (e *UsageError) Error() string {
	if e.Where == "" {
		return e.Err.Error()
	}
	return e.Where + ": " + e.Err.Error()
}

func (e *UsageError) Unwrap() error { return e.Err }

// Usagef returns a *UsageError for where with a formatted message.
func Usagef(where, format string, args ...any) error {
	return &UsageError{Where: where, Err: fmt.Errorf(format, args...)}
}
