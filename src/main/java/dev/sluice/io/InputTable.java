package dev.sluice.io;

import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;

/**
 * A table as read: the data, where it came from, and the partition columns found in its directory
 * layout (kept as partitions when the treated table is written).
 */
public record InputTable(Dataset<Row> data, String path, String format, List<String> partitionColumns) {}
