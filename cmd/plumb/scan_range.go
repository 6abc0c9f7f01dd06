package main

import (
	"fmt"
	"strconv"
	"strings"
)

// maxAxisPoints bounds the values of one --across axis (and, squared, a
// two-axis grid's rows before memory is the user's choice to spend).
const maxAxisPoints = 1_000_000

// axisSpec is one --across NAME=FROM:TO:N: N equally spaced values from
// FROM to TO, both included (N = 1: FROM alone).
type axisSpec struct {
	name     string
	from, to float64
	n        int
}

// values returns the axis's values.
func (a axisSpec) values() []float64 {
	out := make([]float64, a.n)
	for i := range out {
		if a.n == 1 {
			out[i] = a.from
			continue
		}
		out[i] = a.from + (a.to-a.from)*float64(i)/float64(a.n-1)
	}
	if a.n > 1 {
		out[a.n-1] = a.to
	}
	return out
}

func (a axisSpec) String() string {
	return fmt.Sprintf("%s=%s:%s:%d", a.name, formatFloat(a.from), formatFloat(a.to), a.n)
}

// parseAxis parses NAME=FROM:TO:N.
func parseAxis(s string) (axisSpec, error) {
	name, rest, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return axisSpec{}, fmt.Errorf("want NAME=FROM:TO:N, e.g. r=2.8:4:600")
	}
	parts := strings.Split(rest, ":")
	if len(parts) != 3 {
		return axisSpec{}, fmt.Errorf("parameter %s: want FROM:TO:N after the =, got %q", name, rest)
	}
	from, err := parseFinite(parts[0])
	if err != nil {
		return axisSpec{}, fmt.Errorf("parameter %s: FROM: %v", name, err)
	}
	to, err := parseFinite(parts[1])
	if err != nil {
		return axisSpec{}, fmt.Errorf("parameter %s: TO: %v", name, err)
	}
	n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil || n < 1 || n > maxAxisPoints {
		return axisSpec{}, fmt.Errorf("parameter %s: N %q: want a whole number from 1 to %d", name, parts[2], maxAxisPoints)
	}
	if n > 1 && !(from < to) {
		return axisSpec{}, fmt.Errorf("parameter %s: FROM %s must be below TO %s", name, formatFloat(from), formatFloat(to))
	}
	return axisSpec{name: name, from: from, to: to, n: n}, nil
}

// axisList is the repeatable --across flag.
type axisList []axisSpec

func (l *axisList) String() string {
	if l == nil {
		return ""
	}
	parts := make([]string, len(*l))
	for i, a := range *l {
		parts[i] = a.String()
	}
	return strings.Join(parts, ",")
}

// Set parses one more axis.
func (l *axisList) Set(s string) error {
	a, err := parseAxis(s)
	if err != nil {
		return err
	}
	*l = append(*l, a)
	return nil
}

// boxSpec is one --box NAME=LO:HI.
type boxSpec struct {
	name   string
	lo, hi float64
}

// parseBox parses NAME=LO:HI.
func parseBox(s string) (boxSpec, error) {
	name, rest, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return boxSpec{}, fmt.Errorf("want NAME=LO:HI, e.g. x=0:1")
	}
	lo, hi, ok := strings.Cut(rest, ":")
	if !ok {
		return boxSpec{}, fmt.Errorf("state %s: want LO:HI after the =, got %q", name, rest)
	}
	l, err := parseFinite(lo)
	if err != nil {
		return boxSpec{}, fmt.Errorf("state %s: LO: %v", name, err)
	}
	h, err := parseFinite(hi)
	if err != nil {
		return boxSpec{}, fmt.Errorf("state %s: HI: %v", name, err)
	}
	if !(l < h) {
		return boxSpec{}, fmt.Errorf("state %s: LO %s must be below HI %s", name, formatFloat(l), formatFloat(h))
	}
	return boxSpec{name: name, lo: l, hi: h}, nil
}

// boxList is the repeatable --box flag.
type boxList []boxSpec

func (l *boxList) String() string {
	if l == nil {
		return ""
	}
	parts := make([]string, len(*l))
	for i, b := range *l {
		parts[i] = fmt.Sprintf("%s=%s:%s", b.name, formatFloat(b.lo), formatFloat(b.hi))
	}
	return strings.Join(parts, ",")
}

// Set parses one more state's bounds.
func (l *boxList) Set(s string) error {
	b, err := parseBox(s)
	if err != nil {
		return err
	}
	*l = append(*l, b)
	return nil
}
