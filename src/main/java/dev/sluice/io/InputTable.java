package dev.sluice.io;

import java.util.List;
import java.util.Optional;
import java.util.OptionalLong;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;

/**
 * A table as read: the data, where it came from, and the partition columns found in its directory
 * layout (kept as partitions when the treated table is written).
 *
 * @param data every row read; for CSV input it also holds {@link #MALFORMED_COLUMN}, the raw line
 *     of each row that could not be parsed (null for well-formed rows)
 * @param malformedColumn the name of that column, when present
 * @param rowsRead every row of {@code data}, well-formed or not, when reading already counted
 *     them (CSV input); empty otherwise
 */
public record InputTable(
    Dataset<Row> data,
    String path,
    String format,
    List<String> partitionColumns,
    Optional<String> malformedColumn,
    OptionalLong rowsRead) {

  /** Column holding the raw text of a CSV line that could not be parsed. */
  public static final String MALFORMED_COLUMN = "_sluice_malformed_line";

  public InputTable(Dataset<Row> data, String path, String format, List<String> partitionColumns) {
    this(data, path, format, partitionColumns, Optional.empty(), OptionalLong.empty());
  }

  /** The well-formed rows without the malformed-line column: what is profiled and treated. */
  public Dataset<Row> wellFormed() {
    if (malformedColumn.isEmpty()) {
      return data;
    }
    return data.filter(Names.col(malformedColumn.get()).isNull()).drop(malformedColumn.get());
  }
}
