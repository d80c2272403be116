#!/usr/bin/env bash
# Submits Sluice to a Spark standalone cluster. The driver runs here (client mode), so the exit
# code is Sluice's own: 0 success, 2 usage or settings, 3 input, 4 and up as README.md lists.
#
#   SLUICE_MASTER=spark://host:7077 jobs/submit-standalone.sh run --input PATH --output DIR [...]
#
# Settings (environment), with their defaults:
#   SLUICE_MASTER           master URL (required)
#   SPARK_HOME              Spark 4.x (Scala 2.13) installation; else spark-submit on PATH
#   SLUICE_JAR              the job jar (target/sluice-*-job.jar, from mvn package)
#   SLUICE_CONFIG           HOCON settings file, shipped with --files and passed as --config
#                           (none: the reference.conf defaults)
#   SLUICE_DRIVER_MEMORY    driver heap (2g)
#   SLUICE_EXECUTOR_MEMORY  heap of each executor (4g)
#   SLUICE_EXECUTOR_CORES   cores of each executor (2)
#   SLUICE_TOTAL_CORES      cores for the whole job (8)
#   SLUICE_SUBMIT_OPTS      more spark-submit options, e.g. "--conf spark.eventLog.enabled=true"
#   SLUICE_DRY_RUN=1        print the spark-submit command instead of running it
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib/submit-common.sh"

: "${SLUICE_MASTER:?set SLUICE_MASTER to the master URL, e.g. spark://host:7077}"
DEPLOY_MODE=client
SUBMIT=(--master "$SLUICE_MASTER" --total-executor-cores "${SLUICE_TOTAL_CORES:-8}")
sluice_submit "$@"
