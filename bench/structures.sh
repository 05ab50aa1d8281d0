#!/bin/sh
# Side-by-side timing of the lowest 20 modes of spring lattices (one face
# grounded): lsys's lowestmodes path (BenchmarkLattice in lsys) and scipy's
# eigsh with shift-and-invert at 0 (bench/structures_scipy.py), on the same
# matrices. Quick by default (10^4 DOF); --full adds the 10^5-DOF lattices
# (run it alone on the machine: several minutes and up to 1 GB).
set -e
cd "$(dirname "$0")/.."
cases="2d-1e4:100x100 3d-1e4:22x22x22"
[ "$1" = "--full" ] && cases="$cases 2d-1e5:316x316 3d-1e5:47x47x47"
bin=$(mktemp -d)/lsys.test
go test -c -o "$bin" ./lsys
for c in $cases; do
	name=${c%%:*}
	dims=${c#*:}
	/usr/bin/time -f "lsys  $name: peak RSS %M kB, CPU %U s user + %S s system (whole test binary, including building the lattice)" "$bin" -test.run '^$' -test.bench "Lattice/$name\$" -test.benchtime 1x -test.v 2>&1 |
		grep -E 'structures_bench|peak RSS' | sed 's/^ *structures_bench_test.go:[0-9]*: /lsys  /'
	/usr/bin/python3 bench/structures_scipy.py "$dims"
done
