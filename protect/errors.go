package protect

import (
	"errors"
	"fmt"
)

// SpecError is what Parse and WithPrimary return for a spec or a value they
// refuse. Its message starts "protect: "; callers that name the place
// themselves (a flag, a file and line) take Detail, or Unprefixed for an
// error that still unwraps to the SpecError and its cause.
type SpecError struct {
	Kind string // element kind; "" when the spec names no known kind
	Key  string // parameter key the error is about; "" for none
	Err  error  // what is wrong
}

func (e *SpecError) Error() string { return "protect: " + e.Detail() }

// Detail is the message without the package prefix: "diode: key "is": …".
func (e *SpecError) Detail() string {
	s := e.Err.Error()
	if e.Key != "" {
		s = fmt.Sprintf("key %q: %s", e.Key, s)
	}
	if e.Kind != "" {
		s = e.Kind + ": " + s
	}
	return s
}

func (e *SpecError) Unwrap() error { return e.Err }

// Unprefixed returns err with the "protect: " prefix left off its message
// when it is (or wraps) a *SpecError, keeping the error chain; any other
// error is returned as it is.
func Unprefixed(err error) error {
	var se *SpecError
	if !errors.As(err, &se) {
		return err
	}
	return unprefixed{se}
}

type unprefixed struct{ se *SpecError }

func (u unprefixed) Error() string { return u.se.Detail() }
func (u unprefixed) Unwrap() error { return u.se }

func specErrorf(kind, key, format string, args ...any) *SpecError {
	return &SpecError{Kind: kind, Key: key, Err: fmt.Errorf(format, args...)}
}
