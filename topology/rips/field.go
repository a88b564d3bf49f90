package rips

import "fmt"

// maxPrime bounds the coefficient field: products of two coefficients must
// fit in 32 bits.
const maxPrime = 65521

// field is Z/p with a table of multiplicative inverses.
type field struct {
	p   uint32
	inv []uint32 // inv[a]·a ≡ 1 (mod p) for a ≠ 0
}

func newField(p int) (field, error) {
	if p < 2 || p > maxPrime || !IsPrime(p) {
		return field{}, fmt.Errorf("coefficients Z/%d: %d is not a prime in [2, %d]", p, p, maxPrime)
	}
	f := field{p: uint32(p), inv: make([]uint32, p)}
	// inv[a] = −(p div a)·inv[p mod a], from p = (p div a)·a + p mod a.
	f.inv[1] = 1
	for a := uint32(2); a < f.p; a++ {
		f.inv[a] = (f.p - (f.p/a)*f.inv[f.p%a]%f.p) % f.p
	}
	return f, nil
}

func (f *field) mul(a, b uint32) uint32 { return a * b % f.p }
func (f *field) neg(a uint32) uint32    { return (f.p - a) % f.p }
func (f *field) add(a, b uint32) uint32 {
	s := a + b
	if s >= f.p {
		s -= f.p
	}
	return s
}

// lift returns the integer in (−p/2, p/2] congruent to a.
func (f *field) lift(a uint32) int {
	if 2*a > f.p {
		return int(a) - int(f.p)
	}
	return int(a)
}

// IsPrime reports whether p is prime, by trial division; Options.Prime
// must be one.
func IsPrime(p int) bool {
	if p < 2 {
		return false
	}
	for d := 2; d*d <= p; d++ {
		if p%d == 0 {
			return false
		}
	}
	return true
}
