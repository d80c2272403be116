package dev.sluice.plan;

/**
 * Every decision for one column with the numbers it applies, in the order of treatment:
 * validity bounds, outliers, missing values, scaling.
 *
 * @param treated the column's values are rewritten (as DOUBLE for numeric columns)
 * @param validMin values below are incorrect entries (null: no bound)
 * @param invalidAction set-missing or quarantine: what happens to an incorrect entry
 * @param dropReason why the column is not in the treated output (null: it is)
 * @param groups the group-wise limits and fill values (null: the table-wide ones apply to every row)
 */
public record ColumnPlan(
    String name,
    String type,
    String kind,
    String role,
    boolean treated,
    Double validMin,
    Double validMax,
    String invalidAction,
    OutlierPlan outliers,
    MissingPlan missing,
    ScalingPlan scaling,
    String dropReason,
    GroupFigures groups) {

  public boolean kept() {
    return dropReason == null;
  }

  public ColumnPlan dropped(String reason) {
    return new ColumnPlan(name, type, kind, role, treated, validMin, validMax, invalidAction,
        outliers, missing, scaling, reason, groups);
  }

  public ColumnPlan withGroups(GroupFigures figures) {
    return new ColumnPlan(name, type, kind, role, treated, validMin, validMax, invalidAction,
        outliers, missing, scaling, dropReason, figures);
  }
}
