package dev.sluice.profile;

import dev.sluice.stats.CoMoments;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.OrderWindows;
import dev.sluice.stats.ScaledMoments;
import java.util.List;

/**
 * What pass 1 gathered so that the statistics of the treated values can be finished without a
 * pass of their own ({@code treat.TreatedStatsPass#fromPassOne}): it succeeds when every outlier
 * limit falls inside the band pass 1 watched for it, and otherwise pass 2 runs as usual.
 *
 * @param measured the measured columns, in the order of the arrays
 * @param windows each measured column's first-pass windows, which also cover the bands of its
 *     Tukey fences, so that counts below any fence inside them are exact
 * @param regionMoments per measured column, the moments of its valid values in each region of
 *     those windows
 * @param corrColumns the columns of {@code comoments}, in its order
 * @param comoments co-moments after the outlier step with capped entries in constant states, or
 *     null when the correlation analysis does not run
 * @param actions per column of {@code comoments}, what pass 1 assumed its outlier step does
 * @param bands per column of {@code comoments}, {lowEdge, lowTop, highBottom, highEdge}: values
 *     below lowEdge were taken as beyond the lower limit, from lowTop to highBottom as within the
 *     limits, above highEdge as beyond the upper limit; the finish checks the plan agrees
 * @param aside the rows that had a value inside a band, kept where pass 1 read them, or null when
 *     the correlation analysis does not run; {@link #release} frees them
 * @param overflowed more such rows than could be kept: pass 2 must run
 */
public record PassOneShare(
    List<String> measured,
    OrderWindows[] windows,
    ScaledMoments[][] regionMoments,
    List<String> corrColumns,
    CoMoments comoments,
    NumericSteps.Action[] actions,
    double[][] bands,
    RowsAside aside,
    boolean overflowed) {

  /** Rows kept aside by pass 1, with the raw values of {@code corrColumns}. */
  public interface RowsAside {
    /** How many rows. */
    long count();

    /** Their co-moments after {@code steps} (one per column), in an accumulator like {@code empty}. */
    CoMoments treated(NumericSteps[] steps, CoMoments empty);

    /** Frees what holds them; they cannot be read afterwards. */
    void release();
  }

  /** Frees the rows kept aside, if any. */
  public void release() {
    if (aside != null) {
      aside.release();
    }
  }
}
