package dev.sluice.profile;

import static org.assertj.core.api.Assertions.assertThat;

import org.apache.spark.sql.execution.vectorized.ConstantColumnVector;
import org.apache.spark.sql.execution.vectorized.OnHeapColumnVector;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.Decimal;
import org.apache.spark.sql.types.DecimalType;
import org.junit.jupiter.api.Test;

/**
 * {@link Batches#doubles}: each value as DOUBLE, as Spark's cast gives it, and NaN with the null
 * flag where the slot is null, whatever the vector holds in a null's slot. The expected values are
 * the literals written into the vectors, widened as Java widens them (Spark's cast of an integral
 * or FLOAT value to DOUBLE is Java's widening).
 */
class BatchesTest {
  @Test
  void everyTypeIsWidenedAndANullSlotIsNaNWhateverItHolds() {
    int n = 6;
    double[] out = new double[n];
    boolean[] nulls = new boolean[n];
    try (OnHeapColumnVector ints = new OnHeapColumnVector(n, DataTypes.IntegerType)) {
      int[] values = {7, -3, Integer.MAX_VALUE, 0, 41, Integer.MIN_VALUE};
      for (int i = 0; i < n; i++) {
        ints.putInt(i, values[i]);
      }
      // Slots 1 and 4 hold values but are null: a null's slot is not read as its value.
      ints.putNull(1);
      ints.putNull(4);
      assertThat(Batches.doubles(ints, DataTypes.IntegerType, n, out, nulls)).as("nulls").isEqualTo(2);
      assertThat(nulls).containsExactly(false, true, false, false, true, false);
      assertThat(out).containsExactly(7.0, Double.NaN, 2147483647.0, 0.0, Double.NaN, -2147483648.0);
    }
    try (OnHeapColumnVector floats = new OnHeapColumnVector(n, DataTypes.FloatType)) {
      float[] values = {0.1f, 2.5f, -1e30f, Float.NaN, 3f, 0f};
      for (int i = 0; i < n; i++) {
        floats.putFloat(i, values[i]);
      }
      floats.putNull(5);
      assertThat(Batches.doubles(floats, DataTypes.FloatType, n, out, nulls)).as("nulls").isEqualTo(1);
      assertThat(nulls).containsExactly(false, false, false, false, false, true);
      // 0.1f widened is 0.10000000149011612, not 0.1.
      assertThat(out).containsExactly((double) 0.1f, 2.5, (double) -1e30f, Double.NaN, 3.0, Double.NaN);
    }
    try (OnHeapColumnVector longs = new OnHeapColumnVector(n, DataTypes.LongType)) {
      for (int i = 0; i < n; i++) {
        longs.putLong(i, (1L << 53) + i);
      }
      assertThat(Batches.doubles(longs, DataTypes.LongType, n, out, nulls)).as("nulls").isZero();
      assertThat(nulls).containsOnly(false);
      // 2^53 + 1 is not a double: it rounds to even, as Java's and Spark's cast do.
      assertThat(out[1]).isEqualTo(9007199254740992.0);
      assertThat(out[2]).isEqualTo(9007199254740994.0);
    }
  }

  @Test
  void decimalsAndOtherVectorsAreReadOnlyWhereNotNull() {
    int n = 3;
    double[] out = new double[n];
    boolean[] nulls = new boolean[n];
    DecimalType type = DataTypes.createDecimalType(10, 2);
    try (OnHeapColumnVector decimals = new OnHeapColumnVector(n, type)) {
      decimals.putDecimal(0, Decimal.apply("12.25"), 10);
      decimals.putNull(1);
      decimals.putDecimal(2, Decimal.apply("-0.05"), 10);
      assertThat(Batches.doubles(decimals, type, n, out, nulls)).as("nulls").isEqualTo(1);
      assertThat(nulls).containsExactly(false, true, false);
      assertThat(out).containsExactly(12.25, Double.NaN, -0.05);
    }
    // A vector that is not one of Spark's writable ones: read value by value.
    ConstantColumnVector constant = new ConstantColumnVector(n, DataTypes.ShortType);
    constant.setShort((short) -12);
    Batches.doubles(constant, DataTypes.ShortType, n, out, nulls);
    assertThat(out).containsExactly(-12.0, -12.0, -12.0);
    constant.setNull();
    assertThat(Batches.doubles(constant, DataTypes.ShortType, n, out, nulls)).as("nulls").isEqualTo(n);
    assertThat(nulls).containsOnly(true);
    assertThat(out).containsOnly(Double.NaN);
  }
}
