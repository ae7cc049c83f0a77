#!/usr/bin/env bash
# Builds everything with warnings as errors and runs every test. Installs what is missing first.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
cd "$here"
bash cmake/install-deps.sh
# The default suite and the statistical calibration tests (UNDERTOW_CALIBRATION_TESTS).
cmake -S . -B build-test -G Ninja -DCMAKE_BUILD_TYPE=Release -DUNDERTOW_WERROR=ON \
  -DUNDERTOW_CALIBRATION_TESTS=ON >/dev/null
cmake --build build-test
# Two test processes share the two cores: OpenMP threads must sleep, not spin, while they wait.
export OMP_WAIT_POLICY=PASSIVE
ctest --test-dir build-test --output-on-failure -j 2 "$@"
# The readers under libFuzzer with AddressSanitizer and UndefinedBehaviorSanitizer: a second build
# (clang, build-fuzz/) and a fixed set of inputs per reader (about 5 minutes).
bash tests/fuzz/run.sh --fixed "$here/build-fuzz"
# The test suite on that instrumented build (DEVELOPERS.md: Sanitizers).
bash tests/sanitizers/run.sh "$here/build-fuzz"
