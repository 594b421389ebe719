#!/usr/bin/env bash
# What share of a DL4J training step the law layer takes, from a JFR profile of TrainingStepBench (robust to a
# machine that is slower or faster as a whole, unlike the difference of two timed runs).
# Usage: benchmarks/layer-share.sh [shape ...]      shapes: headline (default), small, large
# TIERS="constant-affine constant-affine+limits" benchmarks/layer-share.sh   measures only those tiers
# NET=graph benchmarks/layer-share.sh   the graph path (ConstrainedGraph with a law vertex, GraphTrainingStepBench)
# Per shape and tier (constant-affine+limits: the same laws with a limit on every output that no sample
# touches): samples of the benchmark thread (Java every 2 ms, native every 20 ms, each weighted by its
# period) with a dev.lawful core or adapter frame on the stack, over all its samples. The recording starts
# 10 s into the run (JFR's delay), inside the 12 s of warm-up, so it sees the steady state and not the first
# steps, which compile the laws and the JIT's code once. About 45 s per line.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
mvn -B -q -DskipTests package -pl benchmarks -am
export OMP_NUM_THREADS=1
jar=benchmarks/target/benchmarks.jar
bench='\.TrainingStepBench\.'
[[ "${NET:-layer}" == graph ]] && bench='\.GraphTrainingStepBench\.'
out=benchmarks/target/layer-share
mkdir -p "$out"
java_home="$(java -XshowSettings:properties -version 2>&1 | awk '/java.home =/ {print $3}')"
sed -e '/method-sampling-java-interval/s/[0-9]* ms/2 ms/' "$java_home/lib/jfr/profile.jfc" > "$out/share.jfc"
shapes=("$@")
[[ ${#shapes[@]} -gt 0 ]] || shapes=(headline)
for shape in "${shapes[@]}"; do
  for tier in ${TIERS:-constant-affine affine nonlinear constant-affine+limits}; do
    f="$out/${NET:-layer}-$shape-$tier.jfr"
    java -jar "$jar" "$bench" -p shape="$shape" -p laws="$tier" -wi 6 -w 2 -i 6 -r 2 -f 1 \
      -jvmArgsAppend "-XX:StartFlightRecording=delay=10s,filename=$f,settings=$out/share.jfc" > "$out/${NET:-layer}-$shape-$tier.log" 2>&1
    jfr print --events jdk.ExecutionSample,jdk.NativeMethodSample --stack-depth 200 "$f" | awk -v tag="${NET:-layer} $shape $tier" '
      /^jdk\.(ExecutionSample|NativeMethodSample)/ {if (inev) flush(); inev=1; w=($0 ~ /Native/) ? 20 : 2; law=0; bench=0; next}
      /dev\.lawful\.(enforce|dl4j|algebra)\./ {law=1}
      /TrainingStepBench\.fit/ {bench=1}
      function flush() { if (bench) {n+=w; if (law) l+=w} }
      END {flush(); if (n == 0) {print tag ": no samples"; exit 1}
           printf "%-26s law layer %5.1f%% of the training step (%d of %d ms sampled)\n", tag ":", 100*l/n, l, n}'
  done
done
