package dev.sluice.stats;

/**
 * Running combination (Chan et al.) of groups of rows for one pair of columns: count, both means,
 * both sums of squared deviations and the co-moment. Groups with a constant coordinate (an imputed
 * value) enter with zero squared deviations for it.
 */
final class PairSum {
  private long n;
  private double meanJ;
  private double meanK;
  private double ssJ;
  private double ssK;
  private double co;

  void add(long m, double gMeanJ, double gMeanK, double gSsJ, double gSsK, double gCo) {
    if (m == 0) {
      return;
    }
    long total = n + m;
    double share = (double) m / total;
    double weight = n * share;
    double dj = gMeanJ - meanJ;
    double dk = gMeanK - meanK;
    ssJ += gSsJ + dj * dj * weight;
    ssK += gSsK + dk * dk * weight;
    co += gCo + dj * dk * weight;
    meanJ += dj * share;
    meanK += dk * share;
    n = total;
  }

  /** Sample covariance (n - 1); NaN for fewer than two rows. */
  double covariance() {
    return n < 2 ? Double.NaN : co / (n - 1);
  }

  /** Pearson correlation clamped to [-1, 1]; NaN for fewer than two rows or a zero variance. */
  double correlation() {
    if (n < 2 || !(ssJ > 0.0) || !(ssK > 0.0)) {
      return Double.NaN;
    }
    double r = co / (Math.sqrt(ssJ) * Math.sqrt(ssK));
    return Math.max(-1.0, Math.min(1.0, r));
  }
}
