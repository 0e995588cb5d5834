package feedback

import (
	"fmt"
	"math"
	"unsafe"
)

// ElemType is the element type of a gas column in the host's memory.
type ElemType uint8

// Element types a column can hold.
const (
	// Float64 is an IEEE-754 double.
	Float64 ElemType = iota + 1
	// Float32 is an IEEE-754 single; values are widened on read and rounded on write.
	Float32
	// Int64 is a signed 64-bit integer (IDs).
	Int64
	// Int32 is a signed 32-bit integer (IDs).
	Int32
)

// Size is the element's size in bytes (0 for an unknown type).
func (t ElemType) Size() uintptr {
	switch t {
	case Float64, Int64:
		return 8
	case Float32, Int32:
		return 4
	}
	return 0
}

// String names the type.
func (t ElemType) String() string {
	switch t {
	case Float64:
		return "float64"
	case Float32:
		return "float32"
	case Int64:
		return "int64"
	case Int32:
		return "int32"
	}
	return fmt.Sprintf("ElemType(%d)", uint8(t))
}

// Column is a strided view on one field of the host's gas: element i lives
// at byte offset i*Stride from the base, with the given element type. A
// column built from Go memory keeps that memory alive; a column built from
// C memory (package cgo) must not outlive it. The zero Column is unbound.
type Column struct {
	base   unsafe.Pointer
	stride uintptr
	typ    ElemType
	n      int
}

// Float64s views a contiguous []float64.
func Float64s(s []float64) Column {
	if len(s) == 0 {
		return Column{typ: Float64, stride: 8}
	}
	return Column{base: unsafe.Pointer(&s[0]), stride: 8, typ: Float64, n: len(s)}
}

// Float32s views a contiguous []float32.
func Float32s(s []float32) Column {
	if len(s) == 0 {
		return Column{typ: Float32, stride: 4}
	}
	return Column{base: unsafe.Pointer(&s[0]), stride: 4, typ: Float32, n: len(s)}
}

// Int64s views a contiguous []int64 (IDs).
func Int64s(s []int64) Column {
	if len(s) == 0 {
		return Column{typ: Int64, stride: 8}
	}
	return Column{base: unsafe.Pointer(&s[0]), stride: 8, typ: Int64, n: len(s)}
}

// Strided views n elements of type t starting at first, each stride bytes
// after the previous: one field of an array of structs, e.g.
// Strided(unsafe.Pointer(&parts[0].Mass), len(parts), unsafe.Sizeof(parts[0]), Float64).
// The caller guarantees the memory holds n such elements.
func Strided(first unsafe.Pointer, n int, stride uintptr, t ElemType) Column {
	return Column{base: first, stride: stride, typ: t, n: n}
}

// Field views one field of a Go array of structs in place, without unsafe
// code in the caller: Field(parts, func(p *Particle) *float32 { return &p.X }).
// The field must lie inside the struct (the accessor is called on the first
// element only); an empty slice gives an unbound column.
func Field[T any, E float32 | float64 | int32 | int64](s []T, field func(*T) *E) Column {
	var zero E
	var t ElemType
	switch any(zero).(type) {
	case float32:
		t = Float32
	case float64:
		t = Float64
	case int32:
		t = Int32
	case int64:
		t = Int64
	}
	stride := unsafe.Sizeof(*new(T))
	if len(s) == 0 {
		return Column{typ: t, stride: stride}
	}
	return Column{base: unsafe.Pointer(field(&s[0])), stride: stride, typ: t, n: len(s)}
}

// Len is the number of elements the column holds.
func (c Column) Len() int { return c.n }

// Base is the address of element 0.
func (c Column) Base() unsafe.Pointer { return c.base }

// Bound reports whether the column points at memory.
func (c Column) Bound() bool { return c.base != nil }

// Type is the element type.
func (c Column) Type() ElemType { return c.typ }

// Stride is the byte distance between consecutive elements.
func (c Column) Stride() uintptr { return c.stride }

func (c Column) ptr(i int) unsafe.Pointer { return unsafe.Add(c.base, uintptr(i)*c.stride) }

// At reads element i as float64. It does not check bounds: the Gas it
// belongs to was validated.
func (c Column) At(i int) float64 {
	p := c.ptr(i)
	switch c.typ {
	case Float32:
		return float64(*(*float32)(p))
	case Int64:
		return float64(*(*int64)(p))
	case Int32:
		return float64(*(*int32)(p))
	}
	return *(*float64)(p)
}

// Int reads element i as int64 (IDs). Float columns are truncated.
func (c Column) Int(i int) int64 {
	p := c.ptr(i)
	switch c.typ {
	case Int64:
		return *(*int64)(p)
	case Int32:
		return int64(*(*int32)(p))
	case Float32:
		return int64(*(*float32)(p))
	}
	return int64(*(*float64)(p))
}

// Set writes v to element i, rounding to float32 for Float32 columns.
func (c Column) Set(i int, v float64) {
	p := c.ptr(i)
	switch c.typ {
	case Float32:
		*(*float32)(p) = float32(v)
	case Float64:
		*(*float64)(p) = v
	}
}

func (c Column) check(name string, n int, writable bool) error {
	if c.base == nil {
		return errorf(ErrInvalidArgument, "column %s: not bound", name)
	}
	sz := c.typ.Size()
	if sz == 0 {
		return errorf(ErrInvalidArgument, "column %s: unknown element type %d", name, c.typ)
	}
	if writable && (c.typ == Int64 || c.typ == Int32) {
		return errorf(ErrInvalidArgument, "column %s: must be float32 or float64, got %v", name, c.typ)
	}
	if c.stride < sz {
		return errorf(ErrInvalidArgument, "column %s: stride %d bytes is smaller than its %v elements (%d bytes)", name, c.stride, c.typ, sz)
	}
	if c.n != n {
		return errorf(ErrInvalidArgument, "column %s: holds %d elements, gas has %d", name, c.n, n)
	}
	if uintptr(c.base)%sz != 0 || c.stride%sz != 0 {
		return errorf(ErrInvalidArgument, "column %s: misaligned for %v (base %#x, stride %d)", name, c.typ, uintptr(c.base), c.stride)
	}
	return nil
}

// span is the half-open byte range a column touches.
func (c Column) span() (lo, hi uintptr) {
	if c.n == 0 {
		return uintptr(c.base), uintptr(c.base)
	}
	lo = uintptr(c.base)
	hi = lo + uintptr(c.n-1)*c.stride + c.typ.Size()
	return lo, hi
}

// collides reports whether any element of a shares a byte with any element
// of b.
func collides(a, b Column) bool {
	alo, ahi := a.span()
	blo, bhi := b.span()
	if ahi <= blo || bhi <= alo {
		return false
	}
	if a.stride != b.stride {
		// Interleaved columns of one array of structs share a stride; two
		// columns with different strides whose ranges overlap are refused.
		return true
	}
	s := a.stride
	// Offset of b's elements past the nearest element start of a, in [0, s).
	var off uintptr
	if uintptr(b.base) >= uintptr(a.base) {
		off = (uintptr(b.base) - uintptr(a.base)) % s
	} else {
		off = (s - (uintptr(a.base)-uintptr(b.base))%s) % s
	}
	// b's element starts off bytes after some a element; they collide when
	// off < size(a) or off+size(b) > s.
	return off < a.typ.Size() || off+b.typ.Size() > s
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
