package dev.sluice.treat;

import dev.sluice.stats.CoMoments;
import dev.sluice.stats.QuantileGrid;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.io.Serializable;
import java.io.UncheckedIOException;
import org.apache.spark.sql.Encoder;
import org.apache.spark.sql.Encoders;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.expressions.Aggregator;

/**
 * One vector aggregate of the sums of products of p columns and of their mid-ranks, in place of
 * p(p-1)/2 scalar correlation aggregates. The buffer is updated in place per row and serialized
 * once per partition.
 *
 * <p>Ranks come from each column's pass-1 quantile grid, adjusted for capping (capped values tie
 * at their fence), so the Spearman correlation needs no sort of the table.
 */
public final class CoMomentAggregator extends Aggregator<Row, CoMomentAggregator.Buffer, byte[]> {
  private static final long serialVersionUID = 1L;

  private final double[] centres;
  private final double[] scales;
  private final double[][] gridProbabilities;
  private final double[][] gridValues;
  private final double[] capLower;
  private final double[] capUpper;
  private transient QuantileGrid[] grids;

  /** Sums of products of the values and of their mid-ranks. */
  public static final class Buffer implements Serializable {
    private static final long serialVersionUID = 1L;
    final CoMoments values;
    final CoMoments ranks;
    transient double[] row;
    transient double[] rankRow;

    Buffer(CoMoments values, CoMoments ranks) {
      this.values = values;
      this.ranks = ranks;
    }
  }

  /** {@code scales}: each column's power-of-two factor for its deviations (see CoMoments). */
  public CoMomentAggregator(double[] centres, double[] scales,
      QuantileGrid[] grids, double[] capLower, double[] capUpper) {
    this.centres = centres.clone();
    this.scales = scales.clone();
    this.gridProbabilities = new double[grids.length][];
    this.gridValues = new double[grids.length][];
    for (int i = 0; i < grids.length; i++) {
      gridProbabilities[i] = grids[i].probabilities();
      gridValues[i] = grids[i].values();
    }
    this.capLower = capLower.clone();
    this.capUpper = capUpper.clone();
  }

  @Override
  public Buffer zero() {
    double[] half = new double[centres.length];
    java.util.Arrays.fill(half, 0.5);
    return new Buffer(new CoMoments(centres, scales), new CoMoments(half));
  }

  @Override
  public Buffer reduce(Buffer b, Row row) {
    int p = centres.length;
    if (b.row == null) {
      b.row = new double[p];
      b.rankRow = new double[p];
    }
    QuantileGrid[] g = grids();
    for (int i = 0; i < p; i++) {
      if (row.isNullAt(i)) {
        b.row[i] = Double.NaN;
        b.rankRow[i] = Double.NaN;
      } else {
        double x = row.getDouble(i);
        b.row[i] = x;
        b.rankRow[i] = g[i].midRankAfterCap(x, capLower[i], capUpper[i]);
      }
    }
    b.values.add(b.row);
    b.ranks.add(b.rankRow);
    return b;
  }

  @Override
  public Buffer merge(Buffer a, Buffer b) {
    a.values.merge(b.values);
    a.ranks.merge(b.ranks);
    return a;
  }

  @Override
  public byte[] finish(Buffer b) {
    ByteArrayOutputStream bytes = new ByteArrayOutputStream();
    try (ObjectOutputStream out = new ObjectOutputStream(bytes)) {
      out.writeObject(b.values);
      out.writeObject(b.ranks);
    } catch (IOException e) {
      throw new UncheckedIOException(e);
    }
    return bytes.toByteArray();
  }

  /** Reads back what {@link #finish} wrote: the value and rank accumulators. */
  public static CoMoments[] decode(byte[] bytes) {
    try (ObjectInputStream in = new ObjectInputStream(new ByteArrayInputStream(bytes))) {
      return new CoMoments[] {(CoMoments) in.readObject(), (CoMoments) in.readObject()};
    } catch (IOException e) {
      throw new UncheckedIOException(e);
    } catch (ClassNotFoundException e) {
      throw new IllegalStateException(e);
    }
  }

  private QuantileGrid[] grids() {
    if (grids == null) {
      grids = new QuantileGrid[gridValues.length];
      for (int i = 0; i < grids.length; i++) {
        grids[i] = new QuantileGrid(gridProbabilities[i], gridValues[i]);
      }
    }
    return grids;
  }

  @Override
  public Encoder<Buffer> bufferEncoder() {
    return Encoders.javaSerialization(Buffer.class);
  }

  @Override
  public Encoder<byte[]> outputEncoder() {
    return Encoders.BINARY();
  }
}
