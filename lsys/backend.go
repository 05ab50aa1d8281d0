package lsys

import (
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
)

// denseLAPACK is what lsys calls directly, outside gonum's mat package:
// the Hessenberg reduction and QR iteration of the Schur form.
type denseLAPACK interface {
	Dgehrd(n, ilo, ihi int, a []float64, lda int, tau, work []float64, lwork int)
	Dorghr(n, ilo, ihi int, a []float64, lda int, tau, work []float64, lwork int)
	Dhseqr(job lapack.SchurJob, compz lapack.SchurComp, n, ilo, ihi int, h []float64, ldh int, wr, wi []float64, z []float64, ldz int, work []float64, lwork int) (unconverged int)
}

// denseImpl serves those calls; gonum's mat package reads lapack64's
// implementation. Both are gonum's pure Go unless the build tag lapack
// installs the system library (backend_lapack.go).
var denseImpl denseLAPACK = gonum.Implementation{}

// Backend names the dense linear algebra in use (lsys version, the
// benchmark script).
var Backend = "pure Go (gonum)"
