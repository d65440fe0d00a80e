package protect

import "fmt"

// Param returns the value of one spec parameter of e, in the key's base
// unit ("vth" in volts, "ron" in ohms); ok is false when e has no such key
// (or is an element of another package).
func Param(e Element, key string) (v float64, ok bool) {
	s, isOurs := settableOf(e)
	if !isOurs {
		return 0, false
	}
	f, found := findField(s.fields(), key)
	if !found {
		return 0, false
	}
	return *f.p, true
}

// WithParam returns a copy of e with the spec parameter key set to v,
// checked as Parse would check it (the key's range and the element's own
// rules). Unlike WithPrimary, no other parameter moves with it. It is an
// error when e has no such key.
func WithParam(e Element, key string, v float64) (Element, error) {
	s, isOurs := settableOf(e)
	if !isOurs {
		return nil, fmt.Errorf("protect: %s: no parameter %q", e.Kind(), key)
	}
	f, found := findField(s.fields(), key)
	if !found {
		return nil, fmt.Errorf("protect: %s: unknown key %q: expected one of %s", s.Kind(), key, keyList(s.fields()))
	}
	*f.p = v
	if err := validate(s); err != nil {
		return nil, err
	}
	return s.value(), nil
}
