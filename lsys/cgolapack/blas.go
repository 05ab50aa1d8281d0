//go:build lapack && cgo

package cgolapack

import (
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/netlib/blas/netlib"
)

// Use makes gonum's mat package (and every lapack64 and blas64 caller)
// use this backend: BLAS from OpenBLAS through gonum's netlib companion,
// the dominant LAPACK routines through Implementation.
func Use() {
	blas64.Use(netlib.Implementation{})
	lapack64.Use(Implementation{})
}
