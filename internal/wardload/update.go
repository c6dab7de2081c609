package wardload

// The XUpdate types hold pointers: nil leaves a field as it is. Their
// Apply methods copy the value, set what the update names and validate
// the result, so both stores apply an update the same way.

// setIf sets *dst to *v when v is not nil.
func setIf[T any](dst *T, v *T) {
	if v != nil {
		*dst = *v
	}
}

// validated returns v, or nil and v's validation error.
func validated[T interface{ Validate() error }](v T) (T, error) {
	if err := v.Validate(); err != nil {
		var zero T
		return zero, err
	}
	return v, nil
}
