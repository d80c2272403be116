package dev.sluice.stats;

/**
 * Count, mean, sample standard deviation, minimum and maximum of a column after its gaps are
 * filled with one value, derived exactly from the figures before filling (Chan et al.'s
 * combination with a zero-variance part).
 *
 * <p>The combination runs on values scaled by a {@link PowerScale} factor, so that columns of
 * very large magnitude do not overflow in the squared terms; figures that are truly beyond the
 * double range come out infinite.
 */
public record FilledMoments(long count, double mean, double stddev, double min, double max) {

  /**
   * @param count values before filling; mean, stddev (n - 1), min and max are theirs
   * @param fill the value gaps are filled with, or null when gaps stay empty
   * @param gaps how many entries are filled
   */
  public static FilledMoments of(
      long count, double mean, double stddev, double min, double max, Double fill, long gaps) {
    boolean filling = fill != null && gaps > 0;
    double maxAbs = Math.max(Math.abs(min), Math.abs(max));
    if (filling) {
      maxAbs = Math.max(maxAbs, Math.abs(fill));
    }
    double f = PowerScale.forMagnitude(maxAbs);
    Moments m = Moments.of(count, mean * f, stddev * f, min * f, max * f);
    if (filling) {
      m = m.withPointMass(fill * f, gaps);
    }
    return new FilledMoments(m.count(), m.mean() / f, m.stddev() / f, m.min() / f, m.max() / f);
  }
}
