#!/usr/bin/env bash
# Example of scheduled jobs that treat every day exactly alike: fit a plan once on a reference
# window, review it (jobs/sluice explain --plan ...), then treat each new day's partition with
# that saved plan, on YARN, without refitting. Each day's fences, fill values and scaling are the
# plan's, so the days stay comparable; refit deliberately when the data has moved.
#
#   jobs/daily-with-saved-plan.sh fit FIRST_DAY LAST_DAY    # once: the plan from a window of days
#   jobs/daily-with-saved-plan.sh treat [YYYY-MM-DD]         # daily (default: yesterday)
#
# Settings (environment): SLUICE_INPUT (hdfs:///lake/pallet_checks), SLUICE_OUTPUT
# (hdfs:///clean/pallet_checks), SLUICE_PLAN_DIR (hdfs:///plans/pallet_checks; the plan is
# plan.json in it), SLUICE_CONFIG for the fit (conf/sample.conf), and every setting of
# submit-yarn.sh. Reruns of a day replace that day's partition only. Exit code 4 means the day
# passed a gate limit kept in the plan (by default a marked drift, see conf/sample.conf): the
# day's treated rows are then under $SLUICE_OUTPUT/held/ for review, not in treated/.
set -euo pipefail
HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
INPUT="${SLUICE_INPUT:-hdfs:///lake/pallet_checks}"
OUTPUT="${SLUICE_OUTPUT:-hdfs:///clean/pallet_checks}"
PLANS="${SLUICE_PLAN_DIR:-hdfs:///plans/pallet_checks}"

day() {
  if [[ ! "$1" =~ ^[0-9]{4}-[0-9]{2}-[0-9]{2}$ ]]; then
    echo "sluice: a day must be given as YYYY-MM-DD, not $1" >&2
    exit 2
  fi
}

case "${1:-}" in
  fit)
    [[ $# -eq 3 ]] || { echo "sluice: fit needs FIRST_DAY and LAST_DAY" >&2; exit 2; }
    day "$2"; day "$3"
    export SLUICE_CONFIG="${SLUICE_CONFIG:-$HERE/../conf/sample.conf}"
    exec "$HERE/submit-yarn.sh" fit --input "$INPUT" --output "$PLANS" --replace \
      --where "check_date BETWEEN DATE'$2' AND DATE'$3'"
    ;;
  treat)
    DAY="${2:-$(date -d yesterday +%F)}"
    day "$DAY"
    # The settings are the plan's, gates included: no settings file goes with treat.
    SLUICE_CONFIG= exec "$HERE/submit-yarn.sh" treat --plan "$PLANS/plan.json" \
      --input "$INPUT" --output "$OUTPUT" --where "check_date = DATE'$DAY'"
    ;;
  *)
    echo "sluice: expected fit FIRST_DAY LAST_DAY, or treat [YYYY-MM-DD]" >&2
    exit 2
    ;;
esac
