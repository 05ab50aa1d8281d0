// Package cgolapack is lsys's optional dense backend: gonum's LAPACK
// interface with the routines that dominate large models (the eigenvalue
// QR iteration, the real Schur form and the SVD) handed to the system
// LAPACK through LAPACKE, and BLAS handed to OpenBLAS. It is built only
// with the tag lapack (go build -tags lapack) and needs Debian's
// liblapacke-dev and libopenblas-dev; the default build stays pure Go.
//
// Why: gonum's Dhseqr (its small-bulge multishift QR, Dlaqr5) runs
// unblocked level-1/2 kernels and is several times slower than LAPACK over
// OpenBLAS at n = 500; a faster BLAS alone barely helps it.
package cgolapack
