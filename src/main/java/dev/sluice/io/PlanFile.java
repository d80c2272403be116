package dev.sluice.io;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.json.JsonMapper;
import dev.sluice.SluiceException;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.Gates;
import dev.sluice.plan.Plan;
import dev.sluice.profile.Batches;
import java.io.IOException;
import java.io.InputStream;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * A saved plan.json read back, on any Hadoop file system, for {@code treat}: checked for its
 * format version and against the table it is about to treat.
 */
public final class PlanFile {
  /** Every field of the plan must be known: a misspelt or foreign file is refused, not half read. */
  private static final ObjectMapper JSON = JsonMapper.builder()
      .enable(DeserializationFeature.FAIL_ON_UNKNOWN_PROPERTIES)
      .enable(DeserializationFeature.FAIL_ON_NULL_FOR_PRIMITIVES)
      .build();

  private PlanFile() {}

  /** The plan in {@code file}; exit 3 when it is missing, exit 2 when it is not a plan we can apply. */
  public static Plan read(Configuration conf, String file) {
    Path p = new Path(file);
    JsonNode tree;
    try {
      FileSystem fs = p.getFileSystem(conf);
      if (!fs.exists(p) || fs.getFileStatus(p).isDirectory()) {
        throw SluiceException.input("Plan file " + file + " does not exist or is a directory");
      }
      try (InputStream in = fs.open(p)) {
        tree = JSON.readTree(in);
      }
    } catch (JsonProcessingException e) {
      throw SluiceException.usage("Plan file " + file + " is not JSON: " + e.getOriginalMessage());
    } catch (IOException e) {
      throw SluiceException.input("Cannot read plan file " + file + ": " + e.getMessage(), e);
    }
    JsonNode version = tree == null ? null : tree.get("formatVersion");
    if (version == null || !version.canConvertToInt()) {
      throw SluiceException.usage("Plan file " + file + " has no formatVersion: it is not a plan.json written by Sluice");
    }
    if (version.asInt() < Plan.OLDEST_FORMAT_VERSION || version.asInt() > Plan.FORMAT_VERSION) {
      throw SluiceException.usage("Plan file " + file + " has format version " + version.asInt()
          + "; this Sluice applies versions " + Plan.OLDEST_FORMAT_VERSION + " to " + Plan.FORMAT_VERSION);
    }
    try {
      Plan plan = JSON.treeToValue(tree, Plan.class);
      // Version 2 came before the gates: read as a plan without limits.
      return plan.gates() == null ? plan.withGates(Gates.NONE) : plan;
    } catch (JsonProcessingException e) {
      throw SluiceException.usage("Plan file " + file + " is not a plan this Sluice can apply: "
          + e.getOriginalMessage());
    }
  }

  /**
   * How a plan fits a table.
   *
   * @param plan the plan to apply: as read, or without the columns the table lacks when skipped
   * @param notInPlan the table's columns the plan does not know (they pass through untouched)
   * @param skipped the plan's treated columns the table lacks, left out (only when skipping)
   */
  public record Fitting(Plan plan, List<String> notInPlan, List<String> skipped) {}

  /**
   * Checks that {@code schema} has every column the plan treats, of the same kind (numeric or
   * not). A lacking column fails with exit 3 unless {@code skipMissing}; a changed kind always does.
   */
  public static Fitting check(Plan plan, StructType schema, String file, boolean skipMissing) {
    Map<String, DataType> types = new HashMap<>();
    for (StructField f : schema.fields()) {
      types.put(f.name(), f.dataType());
    }
    List<String> missing = new ArrayList<>();
    List<String> changed = new ArrayList<>();
    List<ColumnPlan> present = new ArrayList<>();
    for (ColumnPlan cp : plan.columns()) {
      DataType t = types.get(cp.name());
      if (t == null) {
        if (cp.treated() && cp.kept()) {
          missing.add(cp.name());
        }
        continue;
      }
      present.add(cp);
      if (cp.treated() && cp.kind().equals("numeric") != Batches.numeric(t)) {
        changed.add(shown(cp.name()) + " (" + cp.type() + " when fitted, " + t.simpleString() + " now)");
      }
    }
    if (!missing.isEmpty() && !skipMissing) {
      throw SluiceException.input("The table lacks " + String.join(", ", missing.stream().map(PlanFile::shown).toList())
          + ", which the plan " + file + " treats (--skip-missing-columns leaves them out)");
    }
    java.util.Set<String> by = new java.util.TreeSet<>();
    java.util.Set<List<Object>> groupings = new java.util.HashSet<>();
    for (ColumnPlan cp : plan.columns()) {
      if (cp.groups() != null) {
        by.addAll(cp.groups().by());
        groupings.add(List.of(cp.groups().by(), cp.groups().groups().stream().map(g -> g.key()).toList()));
      }
    }
    if (groupings.size() > 1) {
      throw SluiceException.usage("Plan file " + file + " is not a plan this Sluice can apply: its group-wise columns"
          + " list different groups (every column of a plan lists the same)");
    }
    List<String> lackingGroups = by.stream().filter(b -> !types.containsKey(b)).toList();
    if (!lackingGroups.isEmpty()) {
      throw SluiceException.input("The table lacks " + String.join(", ", lackingGroups.stream().map(PlanFile::shown).toList())
          + ", which the plan " + file + " groups by");
    }
    if (!changed.isEmpty()) {
      throw SluiceException.input("Column(s) changed kind since the plan " + file + " was fitted: "
          + String.join(", ", changed));
    }
    java.util.Set<String> known = new java.util.HashSet<>(plan.columns().stream().map(ColumnPlan::name).toList());
    List<String> fresh = new ArrayList<>();
    for (StructField f : schema.fields()) {
      if (!known.contains(f.name())) {
        fresh.add(f.name());
      }
    }
    Plan applied = missing.isEmpty() ? plan : plan.withColumns(present);
    return new Fitting(applied, fresh, missing);
  }

  /** A column name as messages show it: plain when it is a simple word, else in quotes. */
  private static String shown(String name) {
    return name.matches("[\\p{L}\\p{N}_]+") ? name : "\"" + name.replace("\"", "\\\"") + "\"";
  }
}
