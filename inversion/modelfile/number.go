package modelfile

import (
	"strconv"
	"strings"
)

// Numbers cross the file boundary in km and km/s but live in m and m/s. Instead
// of multiplying by 1000 (which rounds, so a written-and-read value could change
// in its last bit), the decimal exponent of the text is shifted: "6371.0" km is
// read as the decimal 6371.0e3 m and correctly rounded once. Writing does the
// reverse on the shortest decimal that reads back as the value, so a
// write→read round trip is exact.

// numberError is why a cell is not a usable number.
type numberError string

func (e numberError) Error() string { return string(e) }

const (
	errSyntax numberError = "is not a number"
	errRange  numberError = "is out of range"
)

// isDecimal reports whether s is a plain decimal number:
// [+-] (digits [. [digits]] | . digits) [(e|E) [+-] digits].
func isDecimal(s string) bool {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		expDigits := 0
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			expDigits++
		}
		if expDigits == 0 {
			return false
		}
	}
	return i == len(s)
}

// parseScaled parses the decimal s and returns s × 10^shift, correctly rounded
// once. It accepts only plain decimals (no hex, inf or nan) and rejects values
// that overflow or underflow.
func parseScaled(s string, shift int) (float64, error) {
	if !isDecimal(s) {
		return 0, errSyntax
	}
	mant, exp := s, 0
	if i := strings.IndexAny(s, "eE"); i >= 0 {
		e, err := strconv.Atoi(s[i+1:])
		if err != nil {
			return 0, errRange // exponent beyond int range
		}
		mant, exp = s[:i], e
	}
	if exp > 1<<20 || exp < -(1<<20) {
		return 0, errRange
	}
	v, err := strconv.ParseFloat(mant+"e"+strconv.Itoa(exp+shift), 64)
	if err != nil {
		return 0, errRange // syntax was checked above, so this is a range error
	}
	return v, nil
}

// formatScaled returns a decimal string d with parseScaled(d, shift) == v
// exactly: the shortest representation of v with its decimal point moved
// left by shift places, in plain notation unless the exponent is extreme.
func formatScaled(v float64, shift int) string {
	s := strconv.FormatFloat(v, 'e', -1, 64) // [-]d[.ddd]e±XX
	if shift == 0 {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	sign := ""
	if s[0] == '-' {
		sign, s = "-", s[1:]
	}
	ep := strings.IndexByte(s, 'e')
	exp, _ := strconv.Atoi(s[ep+1:])
	digits := strings.Replace(s[:ep], ".", "", 1)
	if digits == "0" {
		return sign + "0"
	}
	// v = 0.digits × 10^(exp+1); the result is 0.digits × 10^e.
	e := exp + 1 - shift
	var out string
	switch {
	case e <= 0 && e > -6:
		out = "0." + strings.Repeat("0", -e) + digits
	case e > 0 && e <= 21:
		if len(digits) <= e {
			out = digits + strings.Repeat("0", e-len(digits))
		} else {
			out = digits[:e] + "." + digits[e:]
		}
	default:
		out = digits[:1]
		if len(digits) > 1 {
			out += "." + digits[1:]
		}
		out += "e" + strconv.Itoa(e-1)
	}
	return sign + out
}
