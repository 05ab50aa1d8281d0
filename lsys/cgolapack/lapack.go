//go:build lapack && cgo

package cgolapack

/*
#cgo LDFLAGS: -llapacke -lopenblas
#include <lapacke.h>
char* openblas_get_corename(void);
*/
import "C"

import (
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
)

// Implementation is gonum's LAPACK with Dgeev, Dhseqr and Dgesvd from the
// system library. Everything else is gonum's own, so results of the
// routines not overridden are unchanged. Matrices stay row-major (gonum's
// layout); LAPACKE transposes them for the column-major library, an O(n^2)
// copy beside O(n^3) work.
type Implementation struct{ gonum.Implementation }

var _ lapack.Float64 = Implementation{}

// ptr returns the address of s[0], or nil for an empty slice (LAPACK does
// not read arrays it is told are absent).
func ptr(s []float64) *C.double {
	if len(s) == 0 {
		return nil
	}
	return (*C.double)(&s[0])
}

// query answers a workspace query: the LAPACKE driver routines allocate
// their own workspace, so the caller's is not needed.
func query(work []float64, lwork int) bool {
	if lwork == -1 {
		work[0] = 1
		return true
	}
	return false
}

// Dgeev computes eigenvalues and, when asked, left and right eigenvectors
// (LAPACK's balancing, Hessenberg QR and Dtrevc3, as gonum's).
func (Implementation) Dgeev(jobvl lapack.LeftEVJob, jobvr lapack.RightEVJob, n int, a []float64, lda int, wr, wi []float64, vl []float64, ldvl int, vr []float64, ldvr int, work []float64, lwork int) (first int) {
	if query(work, lwork) || n == 0 {
		return 0
	}
	if jobvl != lapack.LeftEVCompute {
		ldvl = max(ldvl, 1)
		vl = nil
	}
	if jobvr != lapack.RightEVCompute {
		ldvr = max(ldvr, 1)
		vr = nil
	}
	info := C.LAPACKE_dgeev(C.LAPACK_ROW_MAJOR, C.char(jobvl), C.char(jobvr), C.lapack_int(n), ptr(a), C.lapack_int(lda),
		ptr(wr), ptr(wi), ptr(vl), C.lapack_int(ldvl), ptr(vr), C.lapack_int(ldvr))
	if info < 0 {
		panic("cgolapack: Dgeev: bad argument")
	}
	return int(info) // > 0: eigenvalues first..n-1 converged, as gonum reports
}

// Dhseqr computes the eigenvalues of an upper Hessenberg matrix and, when
// asked, its Schur form and Schur vectors (0-based ilo, ihi as in gonum).
func (Implementation) Dhseqr(job lapack.SchurJob, compz lapack.SchurComp, n, ilo, ihi int, h []float64, ldh int, wr, wi []float64, z []float64, ldz int, work []float64, lwork int) (unconverged int) {
	if query(work, lwork) || n == 0 {
		return 0
	}
	if compz == lapack.SchurNone {
		ldz = max(ldz, 1)
		z = nil
	}
	info := C.LAPACKE_dhseqr(C.LAPACK_ROW_MAJOR, C.char(job), C.char(compz), C.lapack_int(n), C.lapack_int(ilo+1), C.lapack_int(ihi+1),
		ptr(h), C.lapack_int(ldh), ptr(wr), ptr(wi), ptr(z), C.lapack_int(ldz))
	if info < 0 {
		panic("cgolapack: Dhseqr: bad argument")
	}
	return int(info)
}

// Dgesvd computes the singular value decomposition A = U S V^T.
func (Implementation) Dgesvd(jobU, jobVT lapack.SVDJob, m, n int, a []float64, lda int, s, u []float64, ldu int, vt []float64, ldvt int, work []float64, lwork int) (ok bool) {
	if query(work, lwork) || m == 0 || n == 0 {
		return true
	}
	if jobU == lapack.SVDNone {
		ldu = max(ldu, 1)
		u = nil
	}
	if jobVT == lapack.SVDNone {
		ldvt = max(ldvt, 1)
		vt = nil
	}
	superb := make([]float64, max(min(m, n), 2))
	info := C.LAPACKE_dgesvd(C.LAPACK_ROW_MAJOR, C.char(jobU), C.char(jobVT), C.lapack_int(m), C.lapack_int(n), ptr(a), C.lapack_int(lda),
		ptr(s), ptr(u), C.lapack_int(ldu), ptr(vt), C.lapack_int(ldvt), ptr(superb))
	if info < 0 {
		panic("cgolapack: Dgesvd: bad argument")
	}
	return info == 0
}

// CoreName is the processor kernel OpenBLAS chose (OPENBLAS_CORETYPE
// overrides its own detection).
func CoreName() string { return C.GoString(C.openblas_get_corename()) }
