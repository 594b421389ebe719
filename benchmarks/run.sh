#!/usr/bin/env bash
# Runs a short subset of the JMH suites (a few minutes) and prints the results table.
# Usage: benchmarks/run.sh [JMH options...]   e.g. benchmarks/run.sh EvaluatorBench -prof gc
# A full run: java -jar benchmarks/target/benchmarks.jar (see DEVELOPERS.md).
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
mvn -B -q -DskipTests package -pl benchmarks -am
# ND4J's OpenMP threads busy-wait on small machines; one thread keeps timings stable (GUIDE section 6).
export OMP_NUM_THREADS=1
if [[ $# -eq 0 ]]; then
  set -- -wi 2 -w 1 -i 3 -r 1 -f 1
fi
exec java -jar benchmarks/target/benchmarks.jar "$@"
