# Shared by the submit-*.sh scripts: finds spark-submit and the job jar, ships the config file,
# and runs (or, with SLUICE_DRY_RUN=1, prints) the spark-submit command. Sourced, not run.
#
# The caller sets DEPLOY_MODE (client or cluster) and fills the array SUBMIT with its
# cluster-specific options, then calls sluice_submit "$@" with Sluice's own arguments.

HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"

if [[ -n "${SPARK_HOME:-}" ]]; then
  SPARK_SUBMIT="$SPARK_HOME/bin/spark-submit"
else
  SPARK_SUBMIT="$(command -v spark-submit || echo spark-submit)"
fi

sluice_jar() {
  if [[ -n "${SLUICE_JAR:-}" ]]; then
    echo "$SLUICE_JAR"
    return
  fi
  local found=("$HERE"/target/sluice-*-job.jar)
  if [[ ! -f "${found[0]}" ]]; then
    echo "sluice: no job jar under $HERE/target; build it with: mvn -B -DskipTests package" >&2
    exit 2
  fi
  echo "${found[0]}"
}

sluice_submit() {
  local jar config=() files=()
  jar="$(sluice_jar)"
  if [[ -n "${SLUICE_CONFIG:-}" ]]; then
    if [[ "$SLUICE_CONFIG" == local://* ]]; then
      # Already inside the driver's image: pass its path as it is there.
      config=(--config "${SLUICE_CONFIG#local://}")
    elif [[ ! -f "$SLUICE_CONFIG" ]]; then
      echo "sluice: SLUICE_CONFIG=$SLUICE_CONFIG is not a file" >&2
      exit 2
    else
      # Shipped with the job, so the run's settings travel with it and appear in its logs. A
      # cluster-mode driver finds the file in its working directory under its own name; a
      # client-mode driver reads it where it is.
      files=(--files "$SLUICE_CONFIG")
      if [[ "$DEPLOY_MODE" == cluster ]]; then
        config=(--config "$(basename "$SLUICE_CONFIG")")
      else
        config=(--config "$SLUICE_CONFIG")
      fi
    fi
  fi
  # shellcheck disable=SC2206
  local extra=(${SLUICE_SUBMIT_OPTS:-})
  local cmd=("$SPARK_SUBMIT" --deploy-mode "$DEPLOY_MODE" --class dev.sluice.cli.Main
    --driver-memory "${SLUICE_DRIVER_MEMORY:-2g}"
    --executor-memory "${SLUICE_EXECUTOR_MEMORY:-4g}"
    --executor-cores "${SLUICE_EXECUTOR_CORES:-2}"
    "${SUBMIT[@]}" "${files[@]}" "${extra[@]}" "$jar" "$@" "${config[@]}")
  if [[ "${SLUICE_DRY_RUN:-0}" == 1 ]]; then
    printf '%q ' "${cmd[@]}"
    echo
    return 0
  fi
  if ! command -v "$SPARK_SUBMIT" >/dev/null 2>&1; then
    echo "sluice: spark-submit not found; set SPARK_HOME to a Spark 4.x installation (Scala 2.13)" >&2
    exit 2
  fi
  exec "${cmd[@]}"
}
