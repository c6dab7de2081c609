package server

import (
	"strconv"
	"strings"
)

// formParser reads numbers typed into the settings forms and collects one
// message per bad field in errs. Only plain decimals are accepted: no sign,
// exponent, hex, "NaN" or "Inf", which strconv would otherwise let through.
type formParser struct {
	errs map[string]string
}

// decimal reads a number such as 0.75 or 12. Empty is an error unless
// blankOK, when it reads as 0.
func (p formParser) decimal(field, v string, blankOK bool) float64 {
	v = strings.TrimSpace(v)
	if v == "" {
		if !blankOK {
			p.errs[field] = "Enter a number."
		}
		return 0
	}
	if strings.Contains(v, ",") {
		p.errs[field] = "Use a point for decimals, e.g. 0.75."
		return 0
	}
	whole, frac, dot := strings.Cut(v, ".")
	if len(v) > 20 || (whole == "" && frac == "") || !digits(whole) || !digits(frac) || (dot && frac == "") {
		p.errs[field] = "Enter a number such as 0.75 or 12."
		return 0
	}
	x, err := strconv.ParseFloat(v, 64)
	if err != nil {
		p.errs[field] = "Enter a number such as 0.75 or 12."
		return 0
	}
	return x
}

// whole reads a whole number of at most 9 digits. Empty is an error
// unless blankOK, when it reads as 0.
func (p formParser) whole(field, v string, blankOK bool) int {
	v = strings.TrimSpace(v)
	if v == "" {
		if !blankOK {
			p.errs[field] = "Enter a whole number."
		}
		return 0
	}
	if !digits(v) || len(v) > 9 {
		p.errs[field] = "Enter a whole number such as 8."
		return 0
	}
	n, _ := strconv.Atoi(v) // nine digits always fit
	return n
}

// digits reports whether s is made of the digits 0–9 only ("" is).
func digits(s string) bool {
	return strings.Trim(s, "0123456789") == ""
}
