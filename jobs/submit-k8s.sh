#!/usr/bin/env bash
# Submits Sluice to Kubernetes in cluster mode: the driver runs in a pod from SLUICE_IMAGE, an
# image with Spark 4.x (Scala 2.13) and Java 17 in which the job jar lies at SLUICE_JAR
# (default local:///opt/sluice/sluice-job.jar). The driver pod ends Succeeded or Failed, with
# Sluice's exit code as its container's exit code and the one-line reason in its log
# (kubectl logs <driver pod>); a scheduler should check the pod, not only spark-submit.
#
#   SLUICE_K8S_MASTER=k8s://https://api.example:6443 SLUICE_IMAGE=registry.example/sluice:0.1 \
#     jobs/submit-k8s.sh run --input s3a://lake/table --output s3a://clean/table [...]
#
# Settings (environment), with their defaults:
#   SLUICE_K8S_MASTER       k8s://https://<api server> (required)
#   SLUICE_IMAGE            container image for driver and executors (required)
#   SLUICE_NAMESPACE        namespace (default)
#   SLUICE_SERVICE_ACCOUNT  service account of the driver, allowed to create executor pods (spark)
#   SLUICE_EXECUTORS        executor pods (4)
#   SLUICE_CONFIG           settings file: local://<path in the image>, or a local file, which
#                           spark-submit uploads through spark.kubernetes.file.upload.path (set
#                           it in SLUICE_SUBMIT_OPTS)
#   SLUICE_DRIVER_MEMORY, SLUICE_EXECUTOR_MEMORY, SLUICE_EXECUTOR_CORES, SLUICE_SUBMIT_OPTS,
#   SLUICE_DRY_RUN          as in submit-standalone.sh
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib/submit-common.sh"

: "${SLUICE_K8S_MASTER:?set SLUICE_K8S_MASTER, e.g. k8s://https://api.example:6443}"
: "${SLUICE_IMAGE:?set SLUICE_IMAGE to an image with Spark 4.x and the job jar}"
SLUICE_JAR="${SLUICE_JAR:-local:///opt/sluice/sluice-job.jar}"
DEPLOY_MODE=cluster
SUBMIT=(--master "$SLUICE_K8S_MASTER"
  --conf "spark.kubernetes.container.image=$SLUICE_IMAGE"
  --conf "spark.kubernetes.namespace=${SLUICE_NAMESPACE:-default}"
  --conf "spark.kubernetes.authenticate.driver.serviceAccountName=${SLUICE_SERVICE_ACCOUNT:-spark}"
  --conf "spark.executor.instances=${SLUICE_EXECUTORS:-4}")
sluice_submit "$@"
