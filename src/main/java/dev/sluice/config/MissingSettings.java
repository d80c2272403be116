package dev.sluice.config;

import java.util.Optional;

/**
 * Missing-value handling for one column (or the defaults).
 *
 * @param dropNullRate a column whose null rate after the outlier step exceeds this is dropped
 *     (1.0 never drops)
 * @param constant the fill value of the constant strategy (a number for numeric columns, text
 *     otherwise); empty unless set
 * @param indicator add a boolean column marking the rows that were missing
 */
public record MissingSettings(
    double dropNullRate, ImputeStrategy strategy, Optional<String> constant, boolean indicator) {}
