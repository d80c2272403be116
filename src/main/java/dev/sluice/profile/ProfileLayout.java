package dev.sluice.profile;

import static org.apache.spark.sql.functions.when;
import static org.apache.spark.sql.functions.xxhash64;

import dev.sluice.config.Role;
import dev.sluice.io.Names;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DateType;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.apache.spark.sql.types.TimestampNTZType;

/**
 * What pass 1 reads of each column and where it sits in the projection under the loop.
 *
 * <p>The projection starts with the measured numeric columns cast to DOUBLE, in table order, so
 * that the pilot and the search passes can read the same leading columns from a shorter
 * projection. Then, per column: categorical columns as text plus a 64-bit hash (for the distinct
 * count), identifiers as a hash only, dates and timestamps as Spark holds them (days or
 * microseconds), and every other column as a null test only, so that nested values are never
 * copied.
 */
final class ProfileLayout implements Serializable {
  private static final long serialVersionUID = 1L;

  /** How pass 1 reads a column. */
  enum Read { MEASURED, CATEGORICAL, IDENTIFIER, DATE, TIMESTAMP, LOCAL_TIMESTAMP, OTHER }

  final String[] names;
  /** Spark's name of each column's type, as the summary shows it. */
  final String[] types;
  final ColumnKind[] kinds;
  final Role[] roles;
  final Read[] reads;
  /** Position in the projection of the column's value (its text, for categorical columns). */
  final int[] at;
  /** Position of the column's hash (categorical columns), else -1. */
  final int[] hashAt;
  /** Number of measured columns: positions 0 .. measured - 1 of the projection. */
  final int measured;
  /** Table positions of the categorical columns, and of all others but the measured ones. */
  final int[] categorical;
  final int[] rest;
  /** Each column's Spark type, and its position in the raw selection (columnar batches). */
  final DataType[] rawTypes;
  final int[] rawAt;
  /** Table position of measured column j. */
  final int[] measuredAt;
  /**
   * Projection positions of the group key (groups.by): its 64-bit hash, a LONG right after the
   * measured columns in {@link #pilotProjection}, and at {@code keyAt} in the full projection; its
   * text, an array of the key columns as STRING; -1 when there are no groups.
   */
  final int keyAt;
  final int keyTextAt;
  private final transient Column keyHash;
  private final transient List<Column> raw;
  private final transient List<Column> projection;

  private ProfileLayout(String[] names, String[] types, ColumnKind[] kinds, Role[] roles, Read[] reads, int[] at,
      int[] hashAt, int measured, List<Column> projection, Column keyHash) {
    this.names = names;
    this.types = types;
    this.kinds = kinds;
    this.roles = roles;
    this.reads = reads;
    this.at = at;
    this.hashAt = hashAt;
    this.measured = measured;
    java.util.List<Integer> cat = new java.util.ArrayList<>();
    java.util.List<Integer> others = new java.util.ArrayList<>();
    for (int i = 0; i < reads.length; i++) {
      if (reads[i] == Read.CATEGORICAL) {
        cat.add(i);
      } else {
        others.add(i);
      }
    }
    this.categorical = cat.stream().mapToInt(Integer::intValue).toArray();
    this.rest = others.stream().mapToInt(Integer::intValue).toArray();
    this.keyHash = keyHash;
    this.keyAt = keyHash == null ? -1 : projection.size() - 2;
    this.keyTextAt = keyHash == null ? -1 : projection.size() - 1;
    this.projection = projection;
    this.rawTypes = new DataType[names.length];
    this.rawAt = new int[names.length];
    List<Column> rawColumns = new ArrayList<>();
    for (int i = 0; i < names.length; i++) {
      rawAt[i] = i;
      rawColumns.add(Names.col(names[i]));
    }
    this.raw = List.copyOf(rawColumns);
    this.measuredAt = measuredColumns();
  }

  /**
   * The columns as stored, in table order (so that the scan needs no reordering projection above
   * it): what a columnar pass reads.
   */
  List<Column> raw() {
    return raw;
  }

  /** True when every column can be read from columnar batches as the row projection reads it. */
  boolean columnar() {
    for (int i = 0; i < names.length; i++) {
      boolean ok = switch (reads[i]) {
        case MEASURED -> Batches.numeric(rawTypes[i]);
        case CATEGORICAL, IDENTIFIER -> Batches.hashable(rawTypes[i]);
        default -> true;
      };
      if (!ok) {
        return false;
      }
    }
    return true;
  }

  static ProfileLayout of(StructType schema, Map<String, Role> roles) {
    return of(schema, roles, List.of());
  }

  /**
   * As {@link #of(StructType, Map)}, with the group key of the columns {@code groupBy} (none: no
   * key) at the end of the projection. A group is told by its key columns as STRING, a null
   * apart from every text; the hash covers each column's null flag as well as its text, so that
   * keys differing only in which column is null hash apart.
   */
  static ProfileLayout of(StructType schema, Map<String, Role> roles, List<String> groupBy) {
    StructField[] fields = schema.fields();
    int n = fields.length;
    String[] names = new String[n];
    String[] types = new String[n];
    ColumnKind[] kinds = new ColumnKind[n];
    Role[] rs = new Role[n];
    Read[] reads = new Read[n];
    int[] at = new int[n];
    int[] hashAt = new int[n];
    List<Column> projection = new ArrayList<>();
    for (int i = 0; i < n; i++) {
      names[i] = fields[i].name();
      types[i] = fields[i].dataType().simpleString();
      kinds[i] = ColumnKind.of(fields[i].dataType());
      rs[i] = roles.getOrDefault(names[i], Role.KEEP);
      reads[i] = readOf(kinds[i], rs[i], fields[i]);
      hashAt[i] = -1;
      if (reads[i] == Read.MEASURED) {
        at[i] = projection.size();
        projection.add(ValueExprs.asDouble(names[i]));
      }
    }
    int measured = projection.size();
    for (int i = 0; i < n; i++) {
      Column c = Names.col(names[i]);
      switch (reads[i]) {
        case CATEGORICAL:
          at[i] = projection.size();
          projection.add(c.cast("string"));
          hashAt[i] = projection.size();
          projection.add(when(c.isNotNull(), xxhash64(c)));
          break;
        case IDENTIFIER:
          at[i] = projection.size();
          projection.add(when(c.isNotNull(), xxhash64(c)));
          break;
        case DATE:
        case TIMESTAMP:
        case LOCAL_TIMESTAMP:
          at[i] = projection.size();
          projection.add(c);
          break;
        case OTHER:
          at[i] = projection.size();
          projection.add(c.isNull());
          break;
        default:
          break;
      }
    }
    Column keyHash = null;
    if (!groupBy.isEmpty()) {
      List<Column> hashed = new ArrayList<>();
      List<Column> texts = new ArrayList<>();
      for (String g : groupBy) {
        Column text = Names.col(g).cast("string");
        hashed.add(text.isNull());
        hashed.add(text);
        texts.add(text);
      }
      keyHash = xxhash64(hashed.toArray(new Column[0]));
      projection.add(keyHash);
      projection.add(org.apache.spark.sql.functions.array(texts.toArray(new Column[0])));
    }
    ProfileLayout layout = new ProfileLayout(names, types, kinds, rs, reads, at, hashAt, measured,
        List.copyOf(projection), keyHash);
    for (int i = 0; i < n; i++) {
      layout.rawTypes[i] = fields[i].dataType();
    }
    return layout;
  }

  private static Read readOf(ColumnKind kind, Role role, StructField f) {
    if (role == Role.IDENTIFIER) {
      return Read.IDENTIFIER;
    }
    switch (kind) {
      case NUMERIC:
        return Read.MEASURED;
      case CATEGORICAL:
        return Read.CATEGORICAL;
      case TEMPORAL:
        if (f.dataType() instanceof DateType) {
          return Read.DATE;
        }
        return f.dataType() instanceof TimestampNTZType ? Read.LOCAL_TIMESTAMP : Read.TIMESTAMP;
      default:
        return Read.OTHER;
    }
  }

  List<Column> projection() {
    return projection;
  }

  /** The leading part of the projection: the measured columns as DOUBLE. */
  List<Column> measuredProjection() {
    return projection.subList(0, measured);
  }

  /**
   * The measured columns, then the group key's hash when there are groups (at position
   * {@link #measured}): what the pilot and the search passes read.
   */
  List<Column> pilotProjection() {
    if (keyHash == null) {
      return measuredProjection();
    }
    List<Column> out = new ArrayList<>(measuredProjection());
    out.add(keyHash);
    return out;
  }

  /** Table positions of the measured columns, in projection order. */
  int[] measuredColumns() {
    int[] out = new int[measured];
    for (int i = 0; i < names.length; i++) {
      if (reads[i] == Read.MEASURED) {
        out[at[i]] = i;
      }
    }
    return out;
  }
}
