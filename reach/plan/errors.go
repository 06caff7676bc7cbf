package plan

import "fmt"

// InputError is an error the caller's request caused: a value out of range,
// a position off the terrain data, a profile that cannot fly the
// conditions. Field names the request field at fault as it is spelled in the
// request types ("From", "Alt", "Terrain", "Aircraft", "Area", …; "" when
// no one field is), so that a command line can name its own flag for it;
// Err says what is wrong. Every other error of this package is a failure of
// the computation (or ctx's error).
type InputError struct {
	Field string
	Err   error
}

func (e *InputError) Error() string {
	if e.Field == "" {
		return "plan: " + e.Err.Error()
	}
	return "plan: " + e.Field + ": " + e.Err.Error()
}

func (e *InputError) Unwrap() error { return e.Err }

// inputf returns an *InputError for field with a formatted message.
func inputf(field, format string, args ...any) error {
	return &InputError{Field: field, Err: fmt.Errorf(format, args...)}
}
