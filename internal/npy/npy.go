// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package npy reads arrays in NumPy's NPY format (versions 1.0, 2.0 and
// 3.0, as numpy.lib.format documents it): every numeric dtype numpy
// writes (float16/32/64, int8..64, uint8..64, bool) in either byte
// order, and unicode and byte strings, in C or Fortran order. Reads are
// bounded: the header and the data may not exceed fixed limits, a shape
// is checked against them before anything is allocated, and a truncated
// file allocates no more than it holds.
package npy

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Limits of Read.
const (
	// MaxHeader is the longest header accepted, in bytes (numpy writes
	// headers of a few hundred bytes).
	MaxHeader = 1 << 20
	// MaxElements is the most elements an array may hold (2^27, 1 GiB
	// as float64).
	MaxElements = 1 << 27
	// MaxDims is the most dimensions an array may have.
	MaxDims = 32
	// MaxItem is the largest item size of a string dtype, in bytes.
	MaxItem = 1 << 16
)

// Array is a decoded NPY array in C (row-major) order.
type Array struct {
	// Shape is the array's shape; an empty shape is a scalar.
	Shape []int
	// Descr is the dtype as the file gives it, e.g. "<f4".
	Descr string
	// Kind is 'f' (float), 'i' (signed integer), 'u' (unsigned), 'b'
	// (bool), 'U' (unicode string) or 'S' (byte string).
	Kind byte
	// Numbers holds the values of a numeric or bool array (bool as 0
	// and 1); Strings those of a string array.
	Numbers []float64
	Strings []string
}

// ErrFormat is returned for a stream that is not a valid NPY file.
var ErrFormat = errors.New("npy: invalid file")

func bad(format string, args ...any) error {
	return fmt.Errorf("%w: %s", ErrFormat, fmt.Sprintf(format, args...))
}

// Read decodes one NPY array from r.
func Read(r io.Reader) (*Array, error) {
	var pre [8]byte
	if _, err := io.ReadFull(r, pre[:]); err != nil {
		return nil, bad("too short for the NPY magic and version (%v)", err)
	}
	if string(pre[:6]) != "\x93NUMPY" {
		return nil, bad("no NPY magic string at the start")
	}
	var hlen int
	switch pre[6] {
	case 1:
		var b [2]byte
		if _, err := io.ReadFull(r, b[:]); err != nil {
			return nil, bad("truncated header length")
		}
		hlen = int(binary.LittleEndian.Uint16(b[:]))
	case 2, 3:
		var b [4]byte
		if _, err := io.ReadFull(r, b[:]); err != nil {
			return nil, bad("truncated header length")
		}
		n := binary.LittleEndian.Uint32(b[:])
		if n > MaxHeader {
			return nil, bad("header of %d bytes, above the limit of %d", n, MaxHeader)
		}
		hlen = int(n)
	default:
		return nil, bad("unsupported format version %d.%d", pre[6], pre[7])
	}
	head := make([]byte, hlen)
	if _, err := io.ReadFull(r, head); err != nil {
		return nil, bad("header truncated: want %d bytes", hlen)
	}
	descr, fortran, shape, err := parseHeader(string(head))
	if err != nil {
		return nil, err
	}
	a := &Array{Shape: shape, Descr: descr}
	order, kind, size, err := parseDescr(descr)
	if err != nil {
		return nil, err
	}
	a.Kind = kind
	n := 1
	for _, d := range shape {
		if d > MaxElements || n > MaxElements/max(d, 1) {
			return nil, bad("shape %v holds more than %d elements", shape, MaxElements)
		}
		n *= d
	}
	if int64(n)*int64(size) > int64(MaxElements)*8 {
		return nil, bad("shape %v of %s needs %d bytes, above the limit of %d", shape, descr, int64(n)*int64(size), int64(MaxElements)*8)
	}
	need := int64(n) * int64(size)
	// Read what is there, up to need: a short file allocates no more
	// than it holds.
	var buf bytes.Buffer
	if _, err := io.Copy(&buf, io.LimitReader(r, need)); err != nil {
		return nil, fmt.Errorf("npy: reading the data: %w", err)
	}
	data := buf.Bytes()
	if int64(len(data)) != need {
		return nil, bad("data truncated: shape %v of %s needs %d bytes, the file holds %d", shape, descr, need, len(data))
	}
	if kind == 'U' || kind == 'S' {
		a.Strings = make([]string, n)
		for i := range n {
			item := data[i*size : (i+1)*size]
			if kind == 'S' {
				a.Strings[i] = string(bytes.TrimRight(item, "\x00"))
				continue
			}
			var sb strings.Builder
			for k := 0; k+4 <= len(item); k += 4 {
				c := order.Uint32(item[k:])
				if c == 0 {
					break
				}
				if c > utf8.MaxRune {
					return nil, bad("element %d: code point %#x is not unicode", i, c)
				}
				sb.WriteRune(rune(c))
			}
			a.Strings[i] = sb.String()
		}
	} else {
		a.Numbers = make([]float64, n)
		for i := range n {
			a.Numbers[i] = number(data[i*size:(i+1)*size], order, kind)
		}
	}
	if fortran && len(shape) > 1 {
		a.toC()
	}
	return a, nil
}

// toC reorders a Fortran-order array's elements into C order.
func (a *Array) toC() {
	n := len(a.Numbers) + len(a.Strings)
	// Index of element (i₀, …, i_k) in Fortran order: i₀ + d₀(i₁ + …).
	src := make([]int, n)
	idx := make([]int, len(a.Shape))
	for c := range n {
		f, stride := 0, 1
		for k := range a.Shape {
			f += idx[k] * stride
			stride *= a.Shape[k]
		}
		src[c] = f
		for k := len(a.Shape) - 1; k >= 0; k-- {
			idx[k]++
			if idx[k] < a.Shape[k] {
				break
			}
			idx[k] = 0
		}
	}
	if a.Numbers != nil {
		v := make([]float64, n)
		for c, f := range src {
			v[c] = a.Numbers[f]
		}
		a.Numbers = v
	}
	if a.Strings != nil {
		v := make([]string, n)
		for c, f := range src {
			v[c] = a.Strings[f]
		}
		a.Strings = v
	}
}

// number decodes one numeric item.
func number(b []byte, order binary.ByteOrder, kind byte) float64 {
	switch kind {
	case 'b':
		if b[0] != 0 {
			return 1
		}
		return 0
	case 'f':
		switch len(b) {
		case 2:
			return half(order.Uint16(b))
		case 4:
			return float64(math.Float32frombits(order.Uint32(b)))
		}
		return math.Float64frombits(order.Uint64(b))
	case 'i':
		switch len(b) {
		case 1:
			return float64(int8(b[0]))
		case 2:
			return float64(int16(order.Uint16(b)))
		case 4:
			return float64(int32(order.Uint32(b)))
		}
		return float64(int64(order.Uint64(b)))
	}
	switch len(b) {
	case 1:
		return float64(b[0])
	case 2:
		return float64(order.Uint16(b))
	case 4:
		return float64(order.Uint32(b))
	}
	return float64(order.Uint64(b))
}

// half converts an IEEE 754 binary16 value.
func half(h uint16) float64 {
	sign := 1.0
	if h&0x8000 != 0 {
		sign = -1
	}
	exp := int(h>>10) & 0x1f
	frac := float64(h & 0x3ff)
	switch exp {
	case 0:
		return sign * math.Ldexp(frac, -24)
	case 0x1f:
		if frac != 0 {
			return math.NaN()
		}
		return math.Inf(int(sign))
	}
	return sign * math.Ldexp(1+frac/1024, exp-15)
}

// parseDescr parses a dtype string such as "<f8", "|b1" or "<U7".
func parseDescr(d string) (binary.ByteOrder, byte, int, error) {
	if len(d) < 3 {
		return nil, 0, 0, bad("dtype %q: want a byte order, a kind and a size", d)
	}
	var order binary.ByteOrder
	switch d[0] {
	case '<', '|', '=':
		order = binary.LittleEndian
	case '>':
		order = binary.BigEndian
	default:
		return nil, 0, 0, bad("dtype %q: unknown byte order %q", d, d[0])
	}
	kind := d[1]
	size, err := strconv.Atoi(d[2:])
	if err != nil || size < 1 {
		return nil, 0, 0, bad("dtype %q: bad item size", d)
	}
	ok := false
	switch kind {
	case 'f':
		ok = size == 2 || size == 4 || size == 8
	case 'i', 'u':
		ok = size == 1 || size == 2 || size == 4 || size == 8
	case 'b':
		ok = size == 1
	case 'U':
		ok = size <= MaxItem/4
		size *= 4
	case 'S':
		ok = size <= MaxItem
	}
	if !ok {
		return nil, 0, 0, bad("dtype %q is not supported (want float16/32/64, int or uint 8..64, bool, or a unicode or byte string)", d)
	}
	return order, kind, size, nil
}

// parseHeader parses the header dictionary, e.g.
// {'descr': '<f8', 'fortran_order': False, 'shape': (3, 4), }.
func parseHeader(h string) (descr string, fortran bool, shape []int, err error) {
	h = strings.TrimSpace(h)
	if !strings.HasPrefix(h, "{") || !strings.HasSuffix(h, "}") {
		return "", false, nil, bad("header %q is not a dictionary", clip(h))
	}
	body := h[1 : len(h)-1]
	seen := map[string]bool{}
	for {
		body = strings.TrimLeft(body, " ,\n")
		if body == "" {
			break
		}
		key, rest, ok := quoted(body)
		if !ok {
			return "", false, nil, bad("header key in %q", clip(body))
		}
		rest = strings.TrimLeft(rest, " ")
		if !strings.HasPrefix(rest, ":") {
			return "", false, nil, bad("header: no ':' after %q", key)
		}
		rest = strings.TrimLeft(rest[1:], " ")
		seen[key] = true
		switch key {
		case "descr":
			descr, rest, ok = quoted(rest)
			if !ok {
				return "", false, nil, bad("header: descr is not a string (structured dtypes are not supported)")
			}
		case "fortran_order":
			switch {
			case strings.HasPrefix(rest, "True"):
				fortran, rest = true, rest[4:]
			case strings.HasPrefix(rest, "False"):
				rest = rest[5:]
			default:
				return "", false, nil, bad("header: fortran_order is neither True nor False")
			}
		case "shape":
			if !strings.HasPrefix(rest, "(") {
				return "", false, nil, bad("header: shape is not a tuple")
			}
			end := strings.IndexByte(rest, ')')
			if end < 0 {
				return "", false, nil, bad("header: shape tuple not closed")
			}
			for _, f := range strings.Split(rest[1:end], ",") {
				f = strings.TrimSpace(f)
				if f == "" {
					continue
				}
				v, err := strconv.Atoi(strings.TrimSuffix(f, "L"))
				if err != nil || v < 0 {
					return "", false, nil, bad("header: shape entry %q is not a non-negative integer", f)
				}
				shape = append(shape, v)
				if len(shape) > MaxDims {
					return "", false, nil, bad("header: shape has more than %d dimensions", MaxDims)
				}
			}
			rest = rest[end+1:]
		default:
			return "", false, nil, bad("header: unknown key %q", key)
		}
		body = rest
	}
	for _, k := range []string{"descr", "fortran_order", "shape"} {
		if !seen[k] {
			return "", false, nil, bad("header lacks %q", k)
		}
	}
	return descr, fortran, shape, nil
}

// quoted reads a Python string literal in single or double quotes at
// the start of s.
func quoted(s string) (string, string, bool) {
	if s == "" || (s[0] != '\'' && s[0] != '"') {
		return "", s, false
	}
	end := strings.IndexByte(s[1:], s[0])
	if end < 0 {
		return "", s, false
	}
	return s[1 : 1+end], s[2+end:], true
}

func clip(s string) string {
	if len(s) > 60 {
		return s[:60] + "…"
	}
	return s
}
