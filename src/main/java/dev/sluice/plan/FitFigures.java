package dev.sluice.plan;

import java.util.List;

/**
 * What a column looked like when its plan was fitted, kept in the plan so that {@code treat} can
 * tell how far new data has moved (drift).
 *
 * @param nullRate nulls among the rows read
 * @param binEdges the plan's quartiles Q1, median, Q3: the edges of four bins of usable values
 *     (empty for a column that is not numeric)
 * @param binShares the share of usable values in each bin (below Q1, Q1 to the median, the median
 *     to Q3, from Q3 up); null when the counts could not be read off exactly
 * @param beyondShare the share of usable values beyond the limits the outlier action applied to;
 *     null when no limit applies
 */
public record FitFigures(double nullRate, List<Double> binEdges, List<Double> binShares, Double beyondShare) {}
