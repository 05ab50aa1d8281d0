//go:build lapack && cgo

package lsys

import "lsys/lsys/cgolapack"

// With the tag lapack, eigenvalues, Schur forms, SVDs and BLAS run in the
// system LAPACK and OpenBLAS (see package cgolapack).
func init() {
	cgolapack.Use()
	denseImpl = cgolapack.Implementation{}
	Backend = "LAPACK and OpenBLAS (cgo; OpenBLAS kernel " + cgolapack.CoreName() + ")"
}
