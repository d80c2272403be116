#!/usr/bin/env bash
# Side-by-side benchmark of Sluice against a plain scan, a plain copy and a hand-written MLlib
# pipeline, in one Spark session (see docs/benchmarks.md for results and how to read them).
#
#   jobs/bench.sh [--rows N] [--columns P] [--reps R] [--warmup W] [--data DIR] [--out FILE]
#                 [--skip-peer] [--quick | --growth [--wide-columns W]]
#
# Defaults: 10,000,000 rows x 10 numeric + 2 categorical columns, 3 interleaved repetitions after
# 1 warm-up repetition (run like the others, printed and written, left out of the medians),
# tables generated once under target/bench-data and reused, results in target/bench/results.json.
# --quick: a 20,000-row table and one repetition without warm-up, to check the harness (CI runs
# it; no timing is asserted). --growth: `run` on N x P, 4N x P and N x W (default N = 1,000,000,
# W = 200; W = 0 leaves the wide table out), for the linearity and wide-table goals. --skip-peer leaves
# out the hand-written pipeline (about 2 minutes a repetition), for quicker measurements of the
# other cases while working on them. BENCH_DRIVER_MEMORY sets the heap (default 2g, the memory
# goal).
set -euo pipefail

HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
BUILD="$HERE/target"
cd "$HERE"
if [[ ! -f "$BUILD/local-classpath.txt" || -n "$(find src/main pom.xml -newer "$BUILD/local-classpath.txt" -print -quit)" ]]; then
  echo "bench: building the project..." >&2
  mvn -B -q -DskipTests package >&2
  touch "$BUILD/local-classpath.txt"
fi
export SPARK_LOCAL_IP="${SPARK_LOCAL_IP:-127.0.0.1}"
read -r -a FLAGS < "$BUILD/launcher/java-flags.txt"
exec java "${FLAGS[@]}" -Xms"${BENCH_DRIVER_MEMORY:-2g}" -Xmx"${BENCH_DRIVER_MEMORY:-2g}" -Xss4m \
  -Dlog4j.configurationFile="$HERE/conf/log4j2.properties" -Dsluice.log.file="$BUILD/bench.log" \
  -cp "$BUILD/classes:$(cat "$BUILD/local-classpath.txt")" dev.sluice.bench.Benchmark "$@"
