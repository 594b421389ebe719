#!/usr/bin/env bash
# Builds the benchmarks jar, runs JMH and prints the ratio table (dev.lawful.bench.RatioTable) of the run.
# Usage:
#   benchmarks/run.sh                        the short run (about 5 minutes): KernelBench at its default point,
#                                            InferenceBench and TrainingStepBench at shape=headline
#   benchmarks/run.sh -prof gc               options first: added to the short run (here: allocation figures)
#   benchmarks/run.sh EvaluatorBench -prof gc  a suite name first: exactly these JMH arguments
# The JMH result is written to benchmarks/target/jmh-result.json; the full grids are in DEVELOPERS.md.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
mvn -B -q -DskipTests package -pl benchmarks -am
# ND4J's OpenMP threads busy-wait on small machines; one thread keeps timings stable (docs/platform-facts.md, Deeplearning4j).
export OMP_NUM_THREADS=1
jar=benchmarks/target/benchmarks.jar
result=benchmarks/target/jmh-result.json
if [[ $# -eq 0 || "$1" == -* ]]; then
  # JMH refuses an option given twice: a default is used only when the caller did not give that option
  given=" $* "
  short=('KernelBench|InferenceBench|TrainingStepBench')
  [[ "$given" == *" -p shape="* ]] || short+=(-p shape=headline)
  defaults=(-wi 2 -w 1 -i 3 -r 1 -f 1)
  for ((k = 0; k < ${#defaults[@]}; k += 2)); do
    [[ "$given" == *" ${defaults[k]} "* ]] || short+=("${defaults[k]}" "${defaults[k + 1]}")
  done
  set -- "${short[@]}" "$@"
fi
rm -f "$result"
status=0
java -jar "$jar" -rf json -rff "$result" "$@" || status=$?
if [[ -s "$result" ]]; then
  java -cp "$jar" dev.lawful.bench.RatioTable "$result"
fi
exit "$status"
