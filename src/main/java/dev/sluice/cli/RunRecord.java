package dev.sluice.cli;

import dev.sluice.io.InputTable;
import java.io.IOException;
import java.io.InputStream;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Properties;
import org.apache.spark.sql.SparkSession;

/** The content of run.json: what ran, on what, how many rows went where, and how long it took. */
final class RunRecord {
  private RunRecord() {}

  static Map<String, Object> of(String runId, Arguments args, InputTable table, Map<String, Object> rows,
      Map<String, Double> seconds, Instant started, SparkSession spark) {
    Map<String, Object> r = new LinkedHashMap<>();
    r.put("run_id", runId);
    r.put("command", args.command());
    Map<String, Object> input = new LinkedHashMap<>();
    input.put("path", table.path());
    input.put("format", table.format());
    input.put("partition_columns", table.partitionColumns());
    r.put("input", input);
    r.put("output", args.output());
    r.put("config_file", args.config().orElse(null));
    r.put("where", args.where().orElse(null));
    r.put("overrides", args.sets());
    r.put("rows", withReconciliation(rows));
    Map<String, Double> rounded = new LinkedHashMap<>();
    seconds.forEach((k, v) -> rounded.put(k, Math.round(v * 1000) / 1000.0));
    r.put("seconds", rounded);
    r.put("started", started.toString());
    r.put("finished", Instant.now().toString());
    r.put("status", "succeeded");
    Map<String, Object> versions = new LinkedHashMap<>();
    versions.put("sluice", version());
    versions.put("spark", spark.version());
    versions.put("java", System.getProperty("java.version"));
    r.put("versions", versions);
    return r;
  }

  private static Map<String, Object> withReconciliation(Map<String, Object> rows) {
    Map<String, Object> out = new LinkedHashMap<>(rows);
    if (rows.containsKey("treated")) {
      long read = (Long) rows.get("read");
      out.put("reconciled", read == (Long) rows.get("treated") + (Long) rows.get("quarantined"));
    }
    return out;
  }

  /** The completion marker: which run finished, how (succeeded, or gate limits passed), and its row counts. */
  static String marker(Map<String, Object> record) {
    Map<String, Object> m = new LinkedHashMap<>();
    m.put("run_id", record.get("run_id"));
    m.put("command", record.get("command"));
    m.put("status", record.get("status"));
    m.put("rows", record.get("rows"));
    m.put("finished", record.get("finished"));
    try {
      return dev.sluice.report.Outputs.JSON.writeValueAsString(m);
    } catch (com.fasterxml.jackson.core.JsonProcessingException e) {
      throw new IllegalStateException(e);
    }
  }

  static String version() {
    try (InputStream in = RunRecord.class.getResourceAsStream("/dev/sluice/version.properties")) {
      if (in == null) {
        return "unknown";
      }
      Properties p = new Properties();
      p.load(in);
      return p.getProperty("version", "unknown");
    } catch (IOException e) {
      return "unknown";
    }
  }
}
