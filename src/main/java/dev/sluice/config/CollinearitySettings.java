package dev.sluice.config;

/**
 * @param pairThreshold pairs with |Pearson r| at or above this are reported
 * @param vifLimit the suggested drop set brings every VIF to at most this
 * @param drop drop the suggested columns from the treated output
 * @param maxColumns the analysis is skipped (and reported) above this many numeric columns
 * @param spearmanRows rows of the sample Spearman's rho is computed on (the whole table when it has
 *     no more rows; fewer on wide tables, so that the sample stays within memory)
 */
public record CollinearitySettings(
    boolean enabled, double pairThreshold, double vifLimit, boolean drop, int maxColumns,
    int spearmanRows) {}
