package main

import (
	"math"
	"strconv"
	"unicode/utf8"
)

// obj is a JSON object that keeps its keys in the order they were added, so the
// output reads the same way every time. Values are num, string, bool, int, obj,
// []obj, []num or []string.
type obj struct {
	keys []string
	vals []any
}

// newObj returns an object with room for n keys, so building it does not grow
// slices on the --batch hot path.
func newObj(n int) *obj { return &obj{keys: make([]string, 0, n), vals: make([]any, 0, n)} }

func (o *obj) set(k string, v any) *obj {
	o.keys = append(o.keys, k)
	o.vals = append(o.vals, v)
	return o
}

// num is a float printed with six significant digits: more than any field
// instrument resolves, few enough to read at a glance.
type num float64

func appendJSON(b []byte, v any) []byte {
	switch v := v.(type) {
	case *obj:
		b = append(b, '{')
		for i, k := range v.keys {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendString(b, k)
			b = append(b, ':')
			b = appendJSON(b, v.vals[i])
		}
		return append(b, '}')
	case num:
		return appendNum(b, float64(v))
	case int:
		return strconv.AppendInt(b, int64(v), 10)
	case bool:
		return strconv.AppendBool(b, v)
	case string:
		return appendString(b, v)
	case []string:
		b = append(b, '[')
		for i, s := range v {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendString(b, s)
		}
		return append(b, ']')
	case []num:
		b = append(b, '[')
		for i, x := range v {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendNum(b, float64(x))
		}
		return append(b, ']')
	case []*obj:
		b = append(b, '[')
		for i, x := range v {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendJSON(b, x)
		}
		return append(b, ']')
	case nil:
		return append(b, "null"...)
	}
	panic("appendJSON: unsupported type") // a programming error in this file's callers
}

// appendNum writes v rounded to six significant digits in plain decimal form.
func appendNum(b []byte, v float64) []byte {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return append(b, "null"...) // measure never returns these; never write invalid JSON
	}
	if v == 0 {
		return append(b, '0')
	}
	decimals := 5 - int(math.Floor(math.Log10(math.Abs(v))))
	if decimals < 0 {
		p := math.Pow(10, float64(-decimals))
		return strconv.AppendFloat(b, math.Round(v/p)*p, 'f', 0, 64)
	}
	start := len(b)
	b = strconv.AppendFloat(b, v, 'f', decimals, 64)
	if decimals > 0 {
		for b[len(b)-1] == '0' {
			b = b[:len(b)-1]
		}
		if b[len(b)-1] == '.' {
			b = b[:len(b)-1]
		}
	}
	if string(b[start:]) == "-0" {
		b = append(b[:start], '0')
	}
	return b
}

const hexDigits = "0123456789abcdef"

func appendString(b []byte, s string) []byte {
	b = append(b, '"')
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			switch {
			case c == '"' || c == '\\':
				b = append(b, '\\', c)
			case c < 0x20:
				b = append(b, '\\', 'u', '0', '0', hexDigits[c>>4], hexDigits[c&0xf])
			default:
				b = append(b, c)
			}
			i++
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && size == 1 {
			b = append(b, `\ufffd`...)
		} else {
			b = append(b, s[i:i+size]...)
		}
		i += size
	}
	return append(b, '"')
}
