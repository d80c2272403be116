package dev.sluice.config;

/**
 * How exact quantiles are searched for (they are exact whatever these are; these decide memory and
 * the number of passes).
 *
 * @param pilotRows rows read from the start of a few spread partitions to place the windows whose
 *     values the profile keeps, on tables too large to keep a whole column
 * @param maxHeldValues most values one search window keeps in memory per task before it turns
 *     into a histogram (and the search takes one more pass); tables with at most this many rows
 *     keep whole columns and need no pilot
 */
public record QuantileSettings(int pilotRows, int maxHeldValues) {}
