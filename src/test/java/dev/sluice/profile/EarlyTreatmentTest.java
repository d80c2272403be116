package dev.sluice.profile;

import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.stats.CoMoments;
import dev.sluice.stats.NumericSteps;
import org.junit.jupiter.api.Test;

/**
 * Pass 1's share of pass 2 places each row by its values' bands. Not an outside reference: the
 * co-moments it keeps, with the limits filled in later, must equal those of the rows treated
 * directly once the limits are known (the definition of the treatment).
 */
class EarlyTreatmentTest {
  private static final NumericSteps.Action CAP = NumericSteps.Action.CAP;
  private static final NumericSteps.Action REMOVE = NumericSteps.Action.REMOVE;

  @Test
  void rowsBeyondTheBandsEnterAsConstantsAndRowsInsideAreKeptAside() {
    NumericSteps v = NumericSteps.validity(null, null);
    EarlyTreatment t = new EarlyTreatment(new NumericSteps[] {v, v}, new NumericSteps.Action[] {CAP, REMOVE},
        new double[][] {{-10, -8}, {-10, -8}}, new double[][] {{8, 10}, {8, 10}},
        new CoMoments(new double[] {0, 0}), 5);
    double[][] rows = {{-20, 1}, {0, 30}, {1, 2}, {-9, 0}, {25, -3}, {Double.NaN, 4}, {3, 9.5}};
    for (double[] r : rows) {
      t.add(r);
    }
    assertThat(t.pending).hasSize(2);
    assertThat(t.aside).isEqualTo(2);
    assertThat(t.overflowed).isFalse();
    // Limits -9.5 and 9 as the plan would set them, inside the bands.
    NumericSteps cap = new NumericSteps(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY, CAP, -9.5, 9);
    NumericSteps remove = new NumericSteps(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY, REMOVE, -9.5, 9);
    CoMoments direct = new CoMoments(new double[] {0, 0});
    for (double[] r : rows) {
      direct.add(new double[] {cap.treated(r[0]), remove.treated(r[1])});
    }
    EarlyTreatment.Rows aside = t.takeRows();
    assertThat(t.pending).isEmpty();
    CoMoments early = t.comoments.merge(
        aside.treated(new NumericSteps[] {cap, remove}, t.comoments.emptyCopy()));
    double[][] constants = {{1.5, -9.5, 9}, {0.25, Double.NaN, Double.NaN}};
    double[][] fills = {{1.5, Double.NaN, Double.NaN}, {0.25, Double.NaN, Double.NaN}};
    double[][] a = early.covariance(constants);
    double[][] b = direct.covariance(fills);
    for (int i = 0; i < 2; i++) {
      for (int j = 0; j < 2; j++) {
        assertThat(a[i][j]).isCloseTo(b[i][j], org.assertj.core.api.Assertions.within(1e-12));
      }
    }
  }

  @Test
  void aPartitionWithMoreRowsInsideTheBandsThanItsLimitGivesUp() {
    NumericSteps v = NumericSteps.validity(null, null);
    EarlyTreatment t = new EarlyTreatment(new NumericSteps[] {v}, new NumericSteps.Action[] {CAP},
        new double[][] {{-10, -8}}, new double[][] {{8, 10}}, new CoMoments(new double[] {0}), 2);
    EarlyTreatment other = t.emptyCopy();
    t.add(new double[] {9});
    other.add(new double[] {-9});
    other.add(new double[] {8.5});
    // Rows stay with their partition: merging counts them, and each partition has its own limit.
    assertThat(t.merge(other).overflowed).isFalse();
    assertThat(t.aside).isEqualTo(3);
    assertThat(t.pending).hasSize(1);
    EarlyTreatment third = t.emptyCopy();
    for (double x : new double[] {9, 9.5, -9.5}) {
      third.add(new double[] {x});
    }
    assertThat(t.merge(third).overflowed).isTrue();
  }

  @Test
  void aBatchGivenColumnByColumnIsPlacedAsItsRowsAre() {
    // Not an outside reference: addColumns must place every row as add does, keep the same rows
    // aside in the same order and add the same co-moments, bit for bit. The values cover nulls,
    // NaN, infinities, invalid values, both sides of every band edge, and all three actions.
    NumericSteps any = NumericSteps.validity(null, null);
    NumericSteps bounded = NumericSteps.validity(-50.0, 50.0);
    NumericSteps[] validity = {any, bounded, bounded, any};
    NumericSteps.Action[] actions = {CAP, REMOVE, NumericSteps.Action.LEAVE, CAP};
    double[][] low = {{-10, -8}, {-10, -8}, {-10, -8}, null};
    double[][] high = {{8, 10}, {8, 10}, {8, 10}, {8, 10}};
    double[] centres = {0, 0, 0, 0};
    EarlyTreatment byRow = new EarlyTreatment(validity, actions, low, high, new CoMoments(centres), 40);
    EarlyTreatment byColumn = byRow.emptyCopy();
    double[] pool = {Double.NaN, Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY, -60, 60, -10, -9, -8,
        -0.0, 0, 3, 8, 9, 10, 10.5, -10.5, 49, -49, 50, -50, 51, 1e300};
    java.util.Random random = new java.util.Random(53);
    for (int batch : new int[] {100, 37, 300}) {
      double[][] columns = new double[4][batch];
      for (int r = 0; r < batch; r++) {
        double[] row = new double[4];
        for (int s = 0; s < 4; s++) {
          row[s] = random.nextDouble() < 0.6 ? random.nextGaussian() * 4 : pool[random.nextInt(pool.length)];
          columns[s][r] = row[s];
        }
        byRow.add(row);
      }
      byColumn.addColumns(columns, batch);
    }
    assertThat(byColumn.aside).isEqualTo(byRow.aside).isPositive();
    assertThat(byColumn.overflowed).isEqualTo(byRow.overflowed).isTrue();
    assertThat(byColumn.pending).hasSameSizeAs(byRow.pending);
    for (int i = 0; i < byRow.pending.size(); i++) {
      assertThat(byColumn.pending.get(i)).isEqualTo(byRow.pending.get(i));
    }
    double[][] constants = {{1, -9, 9}, {0.5, -9, 9}, {2, Double.NaN, Double.NaN}, {-1, -9, 9.5}};
    assertThat(byColumn.comoments.rows()).isEqualTo(byRow.comoments.rows());
    assertThat(byColumn.comoments.covariance(constants)).isDeepEqualTo(byRow.comoments.covariance(constants));
  }
}
