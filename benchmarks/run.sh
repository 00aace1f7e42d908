#!/usr/bin/env bash
# Runs the onefold benchmark suite and writes benchmarks/results/RESULTS.md plus SVG plots.
#
#   benchmarks/run.sh short            all questions, short profile (about 15 minutes on 2 cores)
#   benchmarks/run.sh smoke            every benchmark once on tiny data, to check nothing rotted (no speed asserted;
#                                      results go to a temporary directory, the committed results stay untouched)
#   benchmarks/run.sh report           only regenerate RESULTS.md and plots from benchmarks/results/raw/*.json
#
# Options: --questions q1,q6   only these questions (default: all that exist)
#          --records 1000000   only this batch size for question 1 (default: 100000,1000000,5000000)
#          --note "text"       a line printed at the top of RESULTS.md (for example: shared machine, preliminary)
# Anything after -- goes to JMH as is (for example: -- -prof gc).
set -euo pipefail
cd "$(dirname "$0")/.."

profile="${1:-short}"
shift || true
questions="q1,q6"
records="100000,1000000,5000000"
note=""
jmh_extra=()
while [ $# -gt 0 ]; do
  case "$1" in
    --questions) questions="$2"; shift 2 ;;
    --records) records="$2"; shift 2 ;;
    --note) note="$2"; shift 2 ;;
    --) shift; jmh_extra=("$@"); break ;;
    *) echo "unknown option: $1" >&2; exit 2 ;;
  esac
done

jar=benchmarks/target/benchmarks.jar
results=benchmarks/results
case "$profile" in
  short) raw="$results/raw" ;;
  smoke) raw="$(mktemp -d)/raw"; records="2400"; results="$(dirname "$raw")" ;;
  report) ;;
  *) echo "unknown profile: $profile (short, smoke or report)" >&2; exit 2 ;;
esac

report() {
  java -cp "$jar" dev.onefold.benchmarks.report.ResultsReport "$results" "$note"
  echo "wrote $results/RESULTS.md"
}

if [ "$profile" = report ]; then
  report
  exit 0
fi

mvn -B -q -o package -pl benchmarks -am -DskipTests 2>/dev/null || mvn -B -q package -pl benchmarks -am -DskipTests
mkdir -p "$raw"
machine() {
  echo "$(grep -m1 'model name' /proc/cpuinfo 2>/dev/null | cut -d: -f2 | xargs), $(nproc) cores, \
$(awk '/MemTotal/ {printf "%.0f GiB", $2 / 1048576}' /proc/meminfo 2>/dev/null) RAM, $(uname -sr)"
  echo "load average at start: $(cut -d' ' -f1-3 /proc/loadavg 2>/dev/null)"
  echo "run: $(date -u +%Y-%m-%dT%H:%MZ), benchmarks/run.sh $profile --questions $questions --records $records"
}
machine > "$raw/machine.txt"

# iterations by profile and size: single-shot calls, so small batches need more of them to warm up the JIT
iterations() { # size -> "warmups measurements"
  if [ "$profile" = smoke ]; then echo "0 1"; return; fi
  if [ "$1" -le 200000 ]; then echo "5 5"; elif [ "$1" -le 2000000 ]; then echo "1 3"; else echo "1 2"; fi
}

# JMH takes a machine-wide lock so that two measuring runs never overlap; a smoke run measures nothing, so it
# may run beside another JMH run
lock=()
if [ "$profile" = smoke ]; then lock=(-Djmh.ignoreLock=true); fi

jmh() { # name, then JMH arguments
  local name="$1"; shift
  echo "== $name"
  java "${lock[@]}" -jar "$jar" "$@" -f 1 -gc true -rf json -rff "$raw/$name.json" "${jmh_extra[@]}"
}

if [[ ",$questions," == *",q1,"* ]]; then
  for n in ${records//,/ }; do
    read -r wi i < <(iterations "$n")
    jmh "q1-dedupe-$n" 'BatchDedupeBenchmark\.(onefold|handWritten|duckdbQuery)$' -p records="$n" -wi "$wi" -i "$i"
    # loading does not depend on the policy: measured once per size
    jmh "q1-load-$n" 'BatchDedupeBenchmark\.duckdbLoad$' -p policy=last-writer -p records="$n" -wi "$wi" -i "$i"
  done
fi

if [[ ",$questions," == *",q6,"* ]]; then
  if [ "$profile" = smoke ]; then
    jmh "q6-spill" 'SpillBenchmark' -p records=24000 -p budgetMiB=1 -wi 0 -i 1 \
      -prof dev.onefold.benchmarks.support.PeakHeapProfiler
  else
    jmh "q6-spill" 'SpillBenchmark' -wi 1 -i 2 -prof dev.onefold.benchmarks.support.PeakHeapProfiler
  fi
fi

report
