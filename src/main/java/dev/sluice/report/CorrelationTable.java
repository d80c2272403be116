package dev.sluice.report;

import dev.sluice.plan.CollinearityFindings;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/** One row per pair of analysed columns (a before b in table order) with both coefficients. */
public final class CorrelationTable {
  public static final Map<String, Class<?>> COLUMNS = columns();

  private CorrelationTable() {}

  private static Map<String, Class<?>> columns() {
    Map<String, Class<?>> c = new LinkedHashMap<>();
    c.put("column_a", String.class);
    c.put("column_b", String.class);
    c.put("pearson", Double.class);
    c.put("spearman", Double.class);
    c.put("abs_pearson", Double.class);
    c.put("over_threshold", Boolean.class);
    return java.util.Collections.unmodifiableMap(c);
  }

  public static List<Map<String, Object>> rows(CollinearityFindings f) {
    List<Map<String, Object>> out = new ArrayList<>();
    List<String> names = f.columns();
    for (int i = 0; i < names.size(); i++) {
      for (int j = i + 1; j < names.size(); j++) {
        Double r = f.pearson().get(i).get(j);
        Map<String, Object> row = new LinkedHashMap<>();
        row.put("column_a", names.get(i));
        row.put("column_b", names.get(j));
        row.put("pearson", r);
        row.put("spearman", f.spearman().get(i).get(j));
        row.put("abs_pearson", r == null ? null : Math.abs(r));
        row.put("over_threshold", r != null && Math.abs(r) >= f.pairThreshold());
        out.add(row);
      }
    }
    return out;
  }
}
