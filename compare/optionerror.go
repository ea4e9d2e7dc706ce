package compare

import "fmt"

// OptionError is a mistake in what the caller asked for (a flag out of
// range, an option that does not fit the test), not in the data or the
// setup: the command line reports it as a usage error (exit code 2). Its
// message names the flag or option the user can change.
type OptionError struct{ Err error }

func (e *OptionError) Error() string { return e.Err.Error() }
func (e *OptionError) Unwrap() error { return e.Err }

// OptionErrorf returns an *OptionError with a formatted message.
func OptionErrorf(format string, args ...any) error {
	return &OptionError{fmt.Errorf(format, args...)}
}
