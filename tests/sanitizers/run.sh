#!/usr/bin/env bash
# The test suite again, on the build that tests/fuzz/run.sh made with clang, AddressSanitizer and
# UndefinedBehaviorSanitizer (every target instrumented): a memory error, a leak of ours or
# undefined behaviour fails the test that met it. Left out, to keep CI within its time: the
# statistical injection tests (the calibration tests are not registered in that build; the one
# unit test is excluded below) and the demo (the same code as the unit and CLI tests, run hundreds
# of times over), and the process-level checks of sweeps, Slurm, kills and full disks (what they
# check does not depend on the compiler, they run on the release build, and the sweep's code is
# in the unit tests; instrumented, a point of the sweep checks takes 20 s instead of 0.4 s and
# sweep.local ran past its 300 s).
# Usage: tests/sanitizers/run.sh [BUILD (build-fuzz)] [ctest arguments]
set -euo pipefail
here=$(cd "$(dirname "$0")/../.." && pwd)
build=${1:-$here/build-fuzz}
shift || true
cmake --build "$build"
export ASAN_OPTIONS=detect_leaks=1:abort_on_error=0:strict_string_checks=1
export UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1
export LSAN_OPTIONS=suppressions=$here/tests/sanitizers/lsan.supp
export OMP_WAIT_POLICY=PASSIVE
ctest --test-dir "$build" --output-on-failure -j 2 \
  -E "^(demo.checks|sweep.local|sweep.slurm|cli.kill_checks|cli.full_disk_checks|cli.full_disk_commands)$|^Injection and recovery: other realisations" "$@"
