package main

import (
	"math"
	"strconv"
	"unicode/utf8"
)

// obj is a JSON object that keeps its keys in the order they were added, so the
// output reads the same way every time. Fields are typed rather than boxed in
// interfaces: building one costs one allocation, which matters on --batch.
type obj struct{ fields []field }

type fieldKind uint8

const (
	kindNum fieldKind = iota
	kindStr
	kindInt
	kindObj
	kindList
	kindStrs
)

// field is one key and its value: a number in num, anything else in ref. Numbers
// are nearly every field, so they stay unboxed and the struct stays small.
type field struct {
	key  string
	kind fieldKind
	num  float64
	ref  any // string, int, *obj, []*obj or []string, by kind
}

// newObj returns an object with room for n fields.
func newObj(n int) *obj { return &obj{fields: make([]field, 0, n)} }

// num adds a number, printed with six significant digits: more than any field
// instrument resolves, few enough to read at a glance.
func (o *obj) num(k string, v float64) *obj {
	o.fields = append(o.fields, field{key: k, kind: kindNum, num: v})
	return o
}

func (o *obj) add(k string, kind fieldKind, v any) *obj {
	o.fields = append(o.fields, field{key: k, kind: kind, ref: v})
	return o
}

func (o *obj) str(k, v string) *obj           { return o.add(k, kindStr, v) }
func (o *obj) integer(k string, v int) *obj   { return o.add(k, kindInt, v) }
func (o *obj) sub(k string, v *obj) *obj      { return o.add(k, kindObj, v) }
func (o *obj) list(k string, v []*obj) *obj   { return o.add(k, kindList, v) }
func (o *obj) strs(k string, v []string) *obj { return o.add(k, kindStrs, v) }

// appendJSON appends o as compact JSON.
func appendJSON(b []byte, o *obj) []byte {
	b = append(b, '{')
	for i, f := range o.fields {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendString(b, f.key)
		b = append(b, ':')
		switch f.kind {
		case kindNum:
			b = appendNum(b, f.num)
		case kindStr:
			b = appendString(b, f.ref.(string))
		case kindInt:
			b = strconv.AppendInt(b, int64(f.ref.(int)), 10)
		case kindObj:
			b = appendJSON(b, f.ref.(*obj))
		case kindList:
			b = append(b, '[')
			for j, x := range f.ref.([]*obj) {
				if j > 0 {
					b = append(b, ',')
				}
				b = appendJSON(b, x)
			}
			b = append(b, ']')
		case kindStrs:
			b = append(b, '[')
			for j, x := range f.ref.([]string) {
				if j > 0 {
					b = append(b, ',')
				}
				b = appendString(b, x)
			}
			b = append(b, ']')
		}
	}
	return append(b, '}')
}

// appendNum writes v rounded to six significant digits in plain decimal form.
func appendNum(b []byte, v float64) []byte {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return append(b, "null"...) // measure never returns these; never write invalid JSON
	}
	if v == 0 {
		return append(b, '0')
	}
	decimals := 5 - decimalExponent(math.Abs(v))
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

// decimalExponent returns floor(log10(a)) for a > 0 without a logarithm, which
// dominated the cost of printing a --batch line.
func decimalExponent(a float64) int {
	_, e2 := math.Frexp(a) // a = m·2^e2, 0.5 ≤ m < 1
	e := int(math.Floor(float64(e2-1) * math.Log10E * math.Ln2))
	for a >= pow10(e+1) {
		e++
	}
	for a < pow10(e) {
		e--
	}
	return e
}

// pow10 is 10^e, exact from a table over the range numbers here take.
func pow10(e int) float64 {
	if e >= -pow10Bias && e < len(pow10Table)-pow10Bias {
		return pow10Table[e+pow10Bias]
	}
	return math.Pow(10, float64(e))
}

const pow10Bias = 32

var pow10Table = func() (t [65]float64) {
	for i := range t {
		t[i] = math.Pow(10, float64(i-pow10Bias))
	}
	return t
}()

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
