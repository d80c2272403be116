#!/usr/bin/env bash
# Submits Sluice to YARN. Cluster mode by default: the driver runs in the application master's
# container, the settings file travels with --files, and spark-submit exits 0 when the job
# succeeded and non-zero when it failed (Sluice's own exit code and one-line reason are in the
# driver log: yarn logs -applicationId <id>). SLUICE_DEPLOY_MODE=client keeps the driver here and
# returns Sluice's exit code itself.
#
#   jobs/submit-yarn.sh run --input hdfs:///lake/table --output hdfs:///clean/table [...]
#
# Settings (environment), with their defaults:
#   SPARK_HOME, HADOOP_CONF_DIR  Spark 4.x (Scala 2.13) and the cluster's Hadoop configuration
#   SLUICE_DEPLOY_MODE      cluster or client (cluster)
#   SLUICE_QUEUE            YARN queue (default)
#   SLUICE_EXECUTORS        executors to start (4)
#   SLUICE_JAR, SLUICE_CONFIG, SLUICE_DRIVER_MEMORY, SLUICE_EXECUTOR_MEMORY,
#   SLUICE_EXECUTOR_CORES, SLUICE_SUBMIT_OPTS, SLUICE_DRY_RUN   as in submit-standalone.sh
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib/submit-common.sh"

DEPLOY_MODE="${SLUICE_DEPLOY_MODE:-cluster}"
SUBMIT=(--master yarn --queue "${SLUICE_QUEUE:-default}" --num-executors "${SLUICE_EXECUTORS:-4}"
  --conf spark.yarn.maxAppAttempts=1)
sluice_submit "$@"
