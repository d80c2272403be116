package dev.sluice.config;

/**
 * Outlier detection for one column (or the defaults).
 *
 * @param iqrK Tukey k for the inner fences that drive the action (1.5 by default)
 * @param outerK Tukey k for the outer fences that are only reported (3 by default)
 * @param zLimit |z| limit of the zscore method
 * @param madLimit |modified z| limit of the mad method
 */
public record OutlierSettings(
    OutlierMethod method,
    double iqrK,
    double outerK,
    double zLimit,
    double madLimit,
    Direction direction,
    OutlierAction action) {}
