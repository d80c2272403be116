#!/usr/bin/env bash
# Example of a scheduled daily job: treats one day's partition of a table partitioned by
# check_date, on YARN, and replaces only that day's partition of the output (see "--where" in
# README.md). A scheduler calls it once a day; its exit code tells whether the day is done.
#
#   jobs/daily-example.sh [YYYY-MM-DD]     (default: yesterday)
#
# Settings (environment): SLUICE_INPUT (hdfs:///lake/pallet_checks), SLUICE_OUTPUT
# (hdfs:///clean/pallet_checks), SLUICE_CONFIG (conf/sample.conf), and every setting of
# submit-yarn.sh. Reruns of the same day are safe: they replace that day's partition only.
set -euo pipefail
DAY="${1:-$(date -d yesterday +%F)}"
if [[ ! "$DAY" =~ ^[0-9]{4}-[0-9]{2}-[0-9]{2}$ ]]; then
  echo "sluice: the day must be given as YYYY-MM-DD, not $DAY" >&2
  exit 2
fi
HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
export SLUICE_CONFIG="${SLUICE_CONFIG:-$HERE/../conf/sample.conf}"
exec "$HERE/submit-yarn.sh" run \
  --input "${SLUICE_INPUT:-hdfs:///lake/pallet_checks}" \
  --output "${SLUICE_OUTPUT:-hdfs:///clean/pallet_checks}" \
  --where "check_date = DATE'$DAY'"
