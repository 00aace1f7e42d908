#!/usr/bin/env bash
# Runs the onefold benchmark suite and writes benchmarks/results/RESULTS.md plus SVG plots.
#
#   benchmarks/run.sh short            all questions, short profile (about 15 minutes on 2 cores): question 1 at
#                                      100k and 1M for every policy plus 5M for last-writer, question 2 into 0.5M
#                                      and 2M archives, question 4 with 1M keys, question 5 with 0.5M records,
#                                      question 7 on 1M lines; fewer iterations
#   benchmarks/run.sh full             all questions at the issue's full sizes (question 1 at 5M for every policy,
#                                      question 2 into 5M, question 4 with 10M keys, question 5 with 5M records);
#                                      a few hours on 2 cores
#   benchmarks/run.sh smoke            every benchmark once on tiny data, to check nothing rotted (no speed asserted;
#                                      results go to a temporary directory, the committed results stay untouched)
#   benchmarks/run.sh report           only regenerate RESULTS.md and plots from benchmarks/results/raw/*.json
#
# Options: --questions q1,q6   only these questions (default: q1,q2,q3,q4,q5,q6,q7)
#          --records 1000000   only these batch sizes for question 1, every policy (default: 100000,1000000, plus
#                              5000000 in the full profile)
#          --note "text"       a line printed at the top of RESULTS.md (for example: shared machine, preliminary)
# Anything after -- goes to JMH as is (for example: -- -prof gc).
set -euo pipefail
cd "$(dirname "$0")/.."

profile="${1:-short}"
shift || true
questions="q1,q2,q3,q4,q5,q6,q7"
records=""
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
# sizes per profile; question 1's last-writer-only size (5M) applies to the short profile only
case "$profile" in
  short) raw="$results/raw"; records="${records:-100000,1000000}"; q1_last_writer_only="5000000"
         apply_sizes="500000,2000000"; gate_keys="1000000"; reconcile_records="500000"; cli_lines="1000000" ;;
  full) raw="$results/raw"; records="${records:-100000,1000000,5000000}"; q1_last_writer_only=""
        apply_sizes="500000,2000000,5000000"; gate_keys="1000000,10000000"; reconcile_records="5000000"
        cli_lines="1000000" ;;
  smoke) raw="$(mktemp -d)/raw"; records="2400"; results="$(dirname "$raw")"; q1_last_writer_only=""
         apply_sizes="425000"; gate_keys="10000"; reconcile_records="20000"; cli_lines="10000" ;;
  report) ;;
  *) echo "unknown profile: $profile (short, full, smoke or report)" >&2; exit 2 ;;
esac

report() {
  java -cp "$jar" dev.onefold.benchmarks.report.ResultsReport "$results" "$note"
  echo "wrote $results/RESULTS.md"
}

if [ "$profile" = report ]; then
  report
  exit 0
fi

started=$(date +%s)
# the benchmarks jar, and for question 7 the command-line tool's jar (examples/target/onefold.jar)
modules=benchmarks
if [[ ",$questions," == *",q7,"* ]]; then modules=benchmarks,examples; fi
mvn -B -q -o package -pl "$modules" -am -DskipTests 2>/dev/null || mvn -B -q package -pl "$modules" -am -DskipTests
mkdir -p "$raw"
if [ "$profile" != smoke ]; then
  # results of questions this run does not measure stay; those it measures are replaced
  for q in ${questions//,/ }; do rm -f "$raw/$q"-*.json "$raw/$q"-*.log; done
fi
machine() {
  echo "$(grep -m1 'model name' /proc/cpuinfo 2>/dev/null | cut -d: -f2 | xargs), $(nproc) cores, \
$(awk '/MemTotal/ {printf "%.0f GiB", $2 / 1048576}' /proc/meminfo 2>/dev/null) RAM, $(uname -sr)"
  echo "load at start: $(uptime | sed 's/^ *//')"
  echo "run: $(date -u +%Y-%m-%dT%H:%MZ), benchmarks/run.sh $profile --questions $questions --records $records"
}
machine > "$raw/machine.txt"

# iterations by profile and size: single-shot calls, so small batches need more of them to warm up the JIT
iterations() { # size -> "warmups measurements"
  if [ "$profile" = smoke ]; then echo "0 1"; return; fi
  # at 1M a single warmup call left the JIT still compiling the engine's loops in the first measured calls
  if [ "$1" -le 2000000 ]; then echo "5 5"; else echo "2 3"; fi
}

# JMH takes a machine-wide lock so that two measuring runs never overlap; a smoke run measures nothing, so it
# may run beside another JMH run
lock=()
if [ "$profile" = smoke ]; then lock=(-Djmh.ignoreLock=true); fi

jmh() { # name, then JMH arguments
  local name="$1"; shift
  echo "== $name"
  # the log keeps what a benchmark prints besides its score (archive build times, retained bytes per key)
  java "${lock[@]}" -jar "$jar" "$@" -f 1 -gc true -rf json -rff "$raw/$name.json" "${jmh_extra[@]}" \
    | tee "$raw/$name.log"
}
quick() { # warmup and measurement settings for the time-based (not single-shot) benchmarks
  if [ "$profile" = smoke ]; then echo "-wi 0 -i 1 -r 100ms"; elif [ "$profile" = short ]; then
    echo "-wi 2 -w 1s -i 3 -r 1s"; else echo "-wi 3 -w 2s -i 5 -r 2s"; fi
}

if [[ ",$questions," == *",q1,"* ]]; then
  for n in ${records//,/ }; do
    read -r wi i < <(iterations "$n")
    jmh "q1-dedupe-$n" 'BatchDedupeBenchmark\.(onefold|handWritten|duckdbQuery)$' -p records="$n" -wi "$wi" -i "$i"
    # loading does not depend on the policy: measured once per size
    jmh "q1-load-$n" 'BatchDedupeBenchmark\.duckdbLoad$' -p policy=last-writer -p records="$n" -wi "$wi" -i "$i"
  done
  for n in ${q1_last_writer_only//,/ }; do
    read -r wi i < <(iterations "$n")
    jmh "q1-dedupe-$n" 'BatchDedupeBenchmark\.(onefold|handWritten|duckdbQuery)$' -p policy=last-writer \
      -p records="$n" -wi "$wi" -i "$i"
    jmh "q1-load-$n" 'BatchDedupeBenchmark\.duckdbLoad$' -p policy=last-writer -p records="$n" -wi "$wi" -i "$i"
  done
fi

if [[ ",$questions," == *",q2,"* ]]; then
  for n in ${apply_sizes//,/ }; do
    read -r wi i < <(iterations "$n")
    if [ "$profile" != smoke ]; then wi=1; i=3; fi
    jmh "q2-apply-$n" 'IncrementalApplyBenchmark' -p archiveRecords="$n" -wi "$wi" -i "$i"
  done
fi

if [[ ",$questions," == *",q3,"* ]]; then
  # shellcheck disable=SC2046
  jmh "q3-avro" 'AvroRewriteBenchmark' $(quick)
fi

if [[ ",$questions," == *",q4,"* ]]; then
  # shellcheck disable=SC2046
  jmh "q4-gate" 'StreamGateBenchmark' -p windowKeys="$gate_keys" $(quick)
fi

if [[ ",$questions," == *",q5,"* ]]; then
  # shellcheck disable=SC2046
  jmh "q5-reconcile" 'ReconcileArchivesBenchmark' -p records="$reconcile_records" $(quick)
fi

if [[ ",$questions," == *",q6,"* ]]; then
  if [ "$profile" = smoke ]; then
    jmh "q6-spill" 'SpillBenchmark' -p records=240000 -p budgetMiB=1 -wi 0 -i 1 \
      -prof dev.onefold.benchmarks.support.PeakHeapProfiler
  else
    jmh "q6-spill" 'SpillBenchmark' -wi 1 -i 2 -prof dev.onefold.benchmarks.support.PeakHeapProfiler
  fi
fi

if [[ ",$questions," == *",q7,"* ]]; then
  read -r wi i < <(iterations "$cli_lines")
  if [ "$profile" = short ]; then wi=1; i=2; fi
  jmh "q7-cli" 'CommandLineDedupeBenchmark' -p lines="$cli_lines" -p jar=examples/target/onefold.jar -wi "$wi" -i "$i"
fi

echo "run took $(( ($(date +%s) - started) / 60 )) min $(( ($(date +%s) - started) % 60 )) s" | tee -a "$raw/machine.txt"
report
