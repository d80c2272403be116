package dev.sluice.treat;

import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.plan.OutlierPlan;
import dev.sluice.stats.NumericSteps;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The statistics passes apply the validity and outlier steps in Java ({@link NumericSteps}); the
 * writing pass applies them as Catalyst expressions ({@link Treatments}). Both must give the same
 * double, or both no value, for every input, edge values included.
 */
@ExtendWith(SharedSpark.class)
class StepsAgreementTest {
  private static final Double[] EDGES = {null, Double.NaN, Double.NEGATIVE_INFINITY,
      Double.POSITIVE_INFINITY, -0.0, 0.0, -Double.MAX_VALUE, Double.MAX_VALUE, Double.MIN_VALUE,
      -5.0, -4.0, -3.999999, 1.0, 2.5, 7.0, 7.000001, 9.0, 10.0, 10.5};

  @ParameterizedTest
  @ValueSource(strings = {"cap", "set-missing", "quarantine", "flag", "keep"})
  void javaAndCatalystStepsAgree(String action, SparkSession spark) {
    // Validity bounds [-4, 10]; the action applies beyond the limits [1, 7].
    OutlierPlan o = new OutlierPlan("iqr", "both", action, 1.0, 7.0, 1.0, 7.0, -2.0, 10.0, "test");
    Dataset<Row> data = Fixtures.doubles(spark, "x", EDGES);
    List<Row> rows = data.select(Treatments.afterOutliers(column(-4.0, 10.0, o))).collectAsList();
    NumericSteps steps = o.steps(-4.0, 10.0);
    for (int i = 0; i < EDGES.length; i++) {
      double java = steps.treated(EDGES[i] == null ? Double.NaN : EDGES[i]);
      Object spark1 = rows.get(i).get(0);
      if (Double.isNaN(java)) {
        assertThat(spark1).as("input %s", EDGES[i]).isNull();
      } else {
        assertThat((Double) spark1).as("input %s", EDGES[i]).isEqualTo(java);
      }
    }
  }

  @ParameterizedTest
  @ValueSource(strings = {"cap", "set-missing"})
  void aLimitAtZeroTreatsMinusZeroAsZero(String action, SparkSession spark) {
    // -0.0 equals the limit 0.0: it is not beyond it, and keeps its own bits in both steps.
    OutlierPlan o = new OutlierPlan("iqr", "both", action, 0.0, 7.0, 0.0, 7.0, -2.0, 10.0, "test");
    Dataset<Row> data = Fixtures.doubles(spark, "x", EDGES);
    List<Row> rows = data.select(Treatments.afterOutliers(column(null, null, o))).collectAsList();
    NumericSteps steps = o.steps(null, null);
    for (int i = 0; i < EDGES.length; i++) {
      double java = steps.treated(EDGES[i] == null ? Double.NaN : EDGES[i]);
      Object spark1 = rows.get(i).get(0);
      Double got = spark1 == null ? Double.valueOf(Double.NaN) : (Double) spark1;
      assertThat(got).as("input %s", EDGES[i]).isEqualTo(Double.valueOf(java));
    }
  }

  @ParameterizedTest
  @ValueSource(strings = {"cap", "set-missing"})
  void noLimitsOrBoundsLeaveFiniteValuesAlone(String action, SparkSession spark) {
    OutlierPlan o = new OutlierPlan("iqr", "both", action, null, null, null, null, null, null, "test");
    Dataset<Row> data = Fixtures.doubles(spark, "x", EDGES);
    List<Row> rows = data.select(Treatments.afterOutliers(column(null, null, o))).collectAsList();
    NumericSteps steps = o.steps(null, null);
    for (int i = 0; i < EDGES.length; i++) {
      double java = steps.treated(EDGES[i] == null ? Double.NaN : EDGES[i]);
      Object spark1 = rows.get(i).get(0);
      Double got = spark1 == null ? Double.valueOf(Double.NaN) : (Double) spark1;
      assertThat(got).as("input %s", EDGES[i]).isEqualTo(Double.valueOf(java));
    }
  }

  /** Column x with these bounds and outlier decision, table-wide (no groups). */
  private static dev.sluice.plan.ColumnPlan column(Double validMin, Double validMax, OutlierPlan o) {
    return new dev.sluice.plan.ColumnPlan("x", "double", "numeric", "treat", true, validMin, validMax, "set-missing", o,
        null, null, null, null);
  }
}
