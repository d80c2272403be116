package dev.sluice.testing;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/** Loads the outside reference data sets the tests check against. */
public final class ReferenceData {
  private static final Pattern NUMBER_LINE =
      Pattern.compile("\\s*[-+]?\\d+(\\.\\d*)?([eE][-+]?\\d+)?\\s*");
  // The two header layouts of the StRD files: "Sample Mean ... ybar: v" and "mean = v".
  private static final Pattern MEAN = Pattern.compile("(?:ybar:|^mean\\s+=)\\s*([-+0-9.eE]+)");
  private static final Pattern STDDEV =
      Pattern.compile("(?:\\ss:|^standardDeviation\\s+=)\\s*([-+0-9.eE]+)");

  private ReferenceData() {}

  /** A NIST StRD univariate data set with its certified mean and standard deviation (n - 1). */
  public record Strd(String name, double[] data, double certifiedMean, double certifiedStddev) {}

  /**
   * Reads a NIST StRD univariate summary statistics file as shipped in the Commons Math 3.6.1
   * tests jar (org/apache/commons/math3/stat/data). The certified values come from the file's own
   * header; the data are the lines that hold one number only.
   */
  public static Strd strd(String name) {
    List<String> lines = lines("org/apache/commons/math3/stat/data/" + name + ".txt");
    List<Double> data = new ArrayList<>();
    double mean = Double.NaN;
    double stddev = Double.NaN;
    for (String line : lines) {
      if (NUMBER_LINE.matcher(line).matches()) {
        data.add(Double.parseDouble(line.trim()));
      }
      mean = Double.isNaN(mean) ? certified(MEAN, line) : mean;
      stddev = Double.isNaN(stddev) ? certified(STDDEV, line) : stddev;
    }
    return new Strd(name, data.stream().mapToDouble(Double::doubleValue).toArray(), mean, stddev);
  }

  /**
   * The Longley data (NIST StRD linear regression), src/test/resources/reference/longley.csv:
   * 16 rows of y, x1, ..., x6.
   */
  public static double[][] longleyRows() {
    List<double[]> rows = new ArrayList<>();
    for (String line : lines("reference/longley.csv")) {
      if (!line.startsWith("#") && !line.startsWith("y,") && !line.isBlank()) {
        String[] fields = line.split(",");
        double[] row = new double[fields.length];
        for (int i = 0; i < fields.length; i++) {
          row[i] = Double.parseDouble(fields[i]);
        }
        rows.add(row);
      }
    }
    return rows.toArray(new double[0][]);
  }

  public static double[] column(double[][] rows, int j) {
    double[] column = new double[rows.length];
    for (int i = 0; i < rows.length; i++) {
      column[i] = rows[i][j];
    }
    return column;
  }

  private static double certified(Pattern pattern, String line) {
    Matcher m = pattern.matcher(line.trim());
    return m.find() ? Double.parseDouble(m.group(1)) : Double.NaN;
  }

  private static List<String> lines(String resource) {
    InputStream in = ReferenceData.class.getClassLoader().getResourceAsStream(resource);
    if (in == null) {
      throw new IllegalStateException("Missing test resource " + resource);
    }
    try (BufferedReader reader = new BufferedReader(new InputStreamReader(in, StandardCharsets.US_ASCII))) {
      return reader.lines().toList();
    } catch (IOException e) {
      throw new UncheckedIOException(e);
    }
  }
}
