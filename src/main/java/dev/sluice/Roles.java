package dev.sluice;

import dev.sluice.config.ColumnSettings;
import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.profile.ColumnKind;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * The role each column really plays: its configured role, except that partition columns, dates,
 * timestamps and nested or binary columns are always kept unchanged.
 */
final class Roles {
  private Roles() {}

  static Map<String, Role> effective(StructType schema, Settings settings, List<String> partitions) {
    Map<String, Role> roles = new LinkedHashMap<>();
    for (StructField f : schema.fields()) {
      Role r = settings.column(f.name()).role();
      ColumnKind kind = ColumnKind.of(f.dataType());
      boolean passThrough = kind == ColumnKind.TEMPORAL || kind == ColumnKind.OTHER;
      if (partitions.contains(f.name()) || (passThrough && r != Role.IDENTIFIER)) {
        r = r == Role.IDENTIFIER ? r : Role.KEEP;
      }
      roles.put(f.name(), r);
    }
    return roles;
  }

  /**
   * groups.by names columns of the table; a column treated group by group is not also scaled (its
   * scaling would be fitted on the table-wide treatment, so its scaled values would not have the
   * centre and spread the plan states).
   */
  static void checkGroups(StructType schema, Settings settings, Map<String, Role> roles) {
    if (!settings.groups().any()) {
      return;
    }
    List<String> names = List.of(schema.fieldNames());
    List<String> lacking = settings.groups().by().stream().filter(b -> !names.contains(b)).toList();
    if (!lacking.isEmpty()) {
      throw SluiceException.usage("sluice.groups.by names " + String.join(", ", lacking)
          + ", which the table lacks; its columns are: " + dev.sluice.config.SettingsLoader.listed(names));
    }
    List<String> scaled = new ArrayList<>();
    for (StructField f : schema.fields()) {
      ColumnSettings cs = settings.column(f.name());
      Role r = roles.get(f.name());
      boolean treated = r == Role.TREAT || r == Role.REQUIRED;
      boolean groupWise = cs.outliers().method() == dev.sluice.config.OutlierMethod.IQR
          || cs.outliers().method() == dev.sluice.config.OutlierMethod.ZSCORE
          || cs.missing().strategy() == dev.sluice.config.ImputeStrategy.MEDIAN
          || cs.missing().strategy() == dev.sluice.config.ImputeStrategy.MEAN;
      if (treated && ColumnKind.of(f.dataType()) == ColumnKind.NUMERIC && groupWise
          && cs.scaling() != dev.sluice.config.ScalingMethod.NONE) {
        scaled.add(f.name());
      }
    }
    if (!scaled.isEmpty()) {
      throw SluiceException.usage("Scaling is not yet fitted group by group: with sluice.groups.by set, "
          + String.join(", ", scaled) + " would get group-wise limits or fill values, so set their scaling = none");
    }
  }

  /** Settings that cannot apply to a column's type are errors naming the column, before any job. */
  static void checkTypes(StructType schema, Settings settings) {
    List<String> problems = new ArrayList<>();
    for (StructField f : schema.fields()) {
      ColumnSettings cs = settings.columns().get(f.name());
      if (cs == null) {
        continue;
      }
      boolean numeric = ColumnKind.of(f.dataType()) == ColumnKind.NUMERIC;
      if (!numeric && (cs.validMin().isPresent() || cs.validMax().isPresent())) {
        problems.add("Column " + f.name() + " is " + f.dataType().simpleString()
            + ", not numeric: validity bounds (valid-min, valid-max) cannot apply");
      }
    }
    if (!problems.isEmpty()) {
      throw SluiceException.usage(String.join("; ", problems));
    }
  }
}
