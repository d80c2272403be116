package dev.sluice.plan;

import java.util.List;

/**
 * Correlation and VIF results on the treated numeric columns (after imputation).
 *
 * @param status computed, skipped (with the reason) or disabled
 * @param columns the columns analysed, in table order (the matrices' order)
 * @param pearson Pearson r matrix (NaN for zero-variance columns, written as null)
 * @param spearman Spearman rho matrix (Pearson r of mid-ranks)
 * @param vif VIF per analysed column (null where undefined; a singular matrix gives infinite
 *     VIF, written as the text "Infinity" in JSON)
 * @param dependences exact linear dependences found, one line each
 * @param pairs the pairs at or over the threshold
 * @param suggestedDrops columns whose removal brings every VIF under the limit
 * @param dropped columns actually removed from the output (only when drop is configured)
 */
public record CollinearityFindings(
    String status,
    List<String> columns,
    List<List<Double>> pearson,
    List<List<Double>> spearman,
    List<Double> vif,
    List<String> dependences,
    List<PairFinding> pairs,
    List<String> suggestedDrops,
    List<String> dropped,
    double pairThreshold,
    double vifLimit) {

  public record PairFinding(String a, String b, double pearson, double spearman) {}

  public static CollinearityFindings skipped(String why, double threshold, double limit) {
    return new CollinearityFindings(
        why, List.of(), List.of(), List.of(), List.of(), List.of(), List.of(), List.of(),
        List.of(), threshold, limit);
  }
}
