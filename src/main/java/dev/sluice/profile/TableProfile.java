package dev.sluice.profile;

import java.util.List;
import java.util.Optional;

/** The pass-1 profile of a table: its row count and one profile per column, in table order. */
public record TableProfile(long rows, List<ColumnProfile> columns, boolean exactQuantiles) {
  public Optional<ColumnProfile> column(String name) {
    return columns.stream().filter(c -> c.name().equals(name)).findFirst();
  }
}
