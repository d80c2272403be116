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
