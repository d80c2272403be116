package dev.sluice.plan;

import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.config.Direction;
import dev.sluice.config.OutlierAction;
import dev.sluice.config.OutlierMethod;
import dev.sluice.config.OutlierSettings;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Each group's limits and fill by the table-wide rules, and when the first aggregate suffices. */
class GroupPlannerTest {
  private static final OutlierSettings IQR_BOTH =
      new OutlierSettings(OutlierMethod.IQR, 1.5, 3.0, 3.0, 3.5, Direction.BOTH, OutlierAction.CAP);

  private static ColumnPlan column(String method, String action, Double lower, Double upper, String fill) {
    OutlierPlan o = new OutlierPlan(method, "both", action, lower, upper, lower, upper, null, null, "test");
    MissingPlan m = new MissingPlan(false, fill, fill.equals("none") ? null : 0.0, null, false, false, "test");
    return new ColumnPlan("x", "double", "numeric", "treat", true, null, null, "none", o, m, null, null, null);
  }

  private static GroupPlanner.Measured measured(long usable, double q1, double median, double q3, double mean, double sd) {
    return new GroupPlanner.Measured(List.of("D1"), usable, q1, median, q3, mean, sd);
  }

  @Test
  void tukeyFencesOnTheGroupsQuartilesOnTheSidesThePlanLimits() {
    // Tukey (1977): inner fences Q1 - 1.5 IQR and Q3 + 1.5 IQR; here Q1 = 10, Q3 = 20, IQR = 10.
    GroupFigures.Group g = GroupPlanner.limits(column("iqr", "cap", -1.0, 99.0, "median"), IQR_BOTH,
        measured(100, 10, 14, 20, 15, 4), 50);
    assertThat(g.lower()).isEqualTo(-5.0);
    assertThat(g.upper()).isEqualTo(35.0);
    assertThat(g.fallback()).isNull();
    // The table-wide plan limits only the high side (direction high): so does the group.
    OutlierSettings high = new OutlierSettings(OutlierMethod.IQR, 1.5, 3.0, 3.0, 3.5, Direction.HIGH, OutlierAction.CAP);
    GroupFigures.Group h = GroupPlanner.limits(column("iqr", "cap", null, 99.0, "median"), high,
        measured(100, 10, 14, 20, 15, 4), 50);
    assertThat(h.lower()).isNull();
    assertThat(h.upper()).isEqualTo(35.0);
  }

  @Test
  void zScoreLimitsOnTheGroupsMeanAndStandardDeviation() {
    OutlierSettings z = new OutlierSettings(OutlierMethod.ZSCORE, 1.5, 3.0, 3.0, 3.5, Direction.BOTH, OutlierAction.CAP);
    GroupFigures.Group g = GroupPlanner.limits(column("zscore", "cap", -1.0, 1.0, "median"), z,
        measured(100, 10, 14, 20, 15, 4), 50);
    assertThat(g.lower()).isEqualTo(3.0);
    assertThat(g.upper()).isEqualTo(27.0);
  }

  @Test
  void smallOrFlatGroupsTakeTheTableWideFigures() {
    ColumnPlan cp = column("iqr", "cap", -1.0, 99.0, "median");
    assertThat(GroupPlanner.limits(cp, IQR_BOTH, measured(49, 10, 14, 20, 15, 4), 50).fallback())
        .isEqualTo("49 usable values, fewer than groups.min-values = 50: the table-wide figures apply");
    assertThat(GroupPlanner.limits(cp, IQR_BOTH, measured(80, 7, 7, 7, 7, 0), 50).fallback())
        .isEqualTo("IQR is zero in this group: the table-wide figures apply");
  }

  @Test
  void theFillFollowsFromTheFirstAggregateOnlyWhenNoValueCrossesTheMedian() {
    GroupPlanner.Measured m = measured(100, 10, 14, 20, 15, 4);
    GroupFigures.Group limits = new GroupFigures.Group(List.of("D1"), 100, -5.0, 35.0, null, null);
    assertThat(GroupPlanner.fillFromFirst(column("iqr", "cap", -1.0, 99.0, "median"), limits, m)).isEqualTo(14.0);
    assertThat(GroupPlanner.fillFromFirst(column("iqr", "flag", -1.0, 99.0, "mean"), limits, m)).isEqualTo(15.0);
    assertThat(GroupPlanner.fillFromFirst(column("iqr", "cap", -1.0, 99.0, "mean"), limits, m)).isNaN();
    assertThat(GroupPlanner.fillFromFirst(column("iqr", "set-missing", -1.0, 99.0, "median"), limits, m)).isNaN();
    // A limit below the median (possible with a small z-limit): capping moves values across it.
    GroupFigures.Group tight = new GroupFigures.Group(List.of("D1"), 100, 0.0, 12.0, null, null);
    assertThat(GroupPlanner.fillFromFirst(column("zscore", "cap", -1.0, 99.0, "median"), tight, m)).isNaN();
  }
}
