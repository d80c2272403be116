package dev.sluice.profile;

import dev.sluice.config.ColumnSettings;
import dev.sluice.config.ImputeStrategy;
import dev.sluice.config.OutlierMethod;
import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.io.ParquetFooters;
import dev.sluice.io.ParquetPilot;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.OrderWindows;
import dev.sluice.stats.RankSearch;
import dev.sluice.stats.ScaledMoments;
import java.time.Instant;
import java.time.LocalDate;
import java.time.LocalDateTime;
import java.time.ZoneOffset;
import java.time.temporal.ChronoUnit;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.function.Supplier;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.catalyst.InternalRow;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.vectorized.ColumnarBatch;

/**
 * Pass 1: one loop over the table computes every column's counts, moments, exact quartiles,
 * distinct counts and ranges, and the row sample for rank correlations.
 *
 * <p>Quartiles are exact type 7 whatever the table's size ({@link RankSearch}). A row count runs
 * first (from the files' footers for a plain Parquet read, {@link ParquetFooters#read}, else
 * Spark's count); on a table too large to hold a column in memory, a pilot sample of the first
 * rows of a few spread partitions ({@link #pilotPartitions}; of as many row groups, read by the
 * driver from their first pages, for a plain Parquet read: {@link ParquetPilot}) places the
 * windows whose values the pass keeps. A pilot that placed them badly costs an extra pass, never
 * accuracy. Columns using the MAD method cost one more pass, shared by all of them,
 * because the MAD is a median of distances from the median.
 */
public final class Profiler {
  /** The quantiles pass 1 finds for every measured column. */
  static final double[] QUARTILES = {0.25, 0.5, 0.75};
  /** Partitions the pilot samples, at most. */
  static final int PILOT_PARTITIONS = 16;
  /** Most values the pilot and the row sample hold, over all their columns. */
  static final int VALUE_BUDGET = 4_000_000;

  private Profiler() {}

  /** Profiles {@code data}; {@code roles} gives each column's effective role. */
  public static TableProfile profile(Dataset<Row> data, Settings settings, Map<String, Role> roles) {
    return profile(data, settings, roles, true);
  }

  /** {@code columnar}: read columnar batches where the scan offers them (false: always rows). */
  static TableProfile profile(Dataset<Row> data, Settings settings, Map<String, Role> roles,
      boolean columnar) {
    // A plain Parquet read is counted from its footers: no Spark job.
    Optional<ParquetFooters.Files> files = ParquetFooters.read(data);
    long rows = files.isPresent() ? files.get().rows() : data.count();
    ProfileLayout layout = ProfileLayout.of(data.schema(), roles);
    List<String> grouped = groupCandidates(layout, settings);
    List<String> groupedText = groupTextCandidates(layout, settings);
    if (!grouped.isEmpty() || !groupedText.isEmpty()) {
      layout = ProfileLayout.of(data.schema(), roles, settings.groups().by());
    }
    int[] measured = layout.measuredColumns();
    // Planned by Spark only when a pass or Spark's pilot reads it: with the pilot read from the
    // Parquet files and every search done in pass 1, never (planning it took 25-47 ms).
    ProfileLayout planned = layout;
    Supplier<JavaRDD<InternalRow>> numeric = memoized(() -> RowScan.rows(data, planned.pilotProjection()));
    int perWindow = settings.quantiles().heldPerWindow(QUARTILES.length * measured.length);
    RowScan.Pilot taken = rows > perWindow && measured.length > 0
        ? pilot(data, files, numeric, layout, measured, settings)
        : new RowScan.Pilot(new double[measured.length][0], new long[0]);
    double[][] pilot = taken.values();
    NumericSteps[] validity = new NumericSteps[measured.length];
    for (int j = 0; j < measured.length; j++) {
      ColumnSettings cs = settings.column(layout.names[measured[j]]);
      validity[j] = NumericSteps.validity(boxed(cs.validMin()), boxed(cs.validMax()));
    }
    GroupTally tally = grouped.isEmpty() && groupedText.isEmpty() ? null
        : groupTally(layout, measured, validity, grouped, groupedText, taken, rows, settings);
    int[] sampled = sampledColumns(layout, measured, settings);
    // The group tally reads each row's group key from Spark's rows.
    Optional<JavaRDD<ColumnarBatch>> batches = columnar && tally == null && layout.columnar()
        ? Batches.of(data.select(layout.raw().toArray(new Column[0]))) : Optional.empty();
    double[][] usable = new double[measured.length][];
    // Columns sorted side by side on the driver's cores, while the executors wait for pass 1.
    java.util.stream.IntStream.range(0, measured.length).parallel()
        .forEach(j -> usable[j] = RankSearch.sorted(usable(pilot[j], validity[j])));
    EarlySetup early = pilot.length > 0 && pilot[0].length > 0
        ? EarlySetup.of(settings, layout, validity, pilot, usable, rows,
            batches.isPresent() ? batches.get().getNumPartitions() : numeric.get().getNumPartitions(),
            sampled, perWindow) : null;
    List<RankSearch> searches = new ArrayList<>();
    OrderWindows[] first = firstWindows(perWindow, usable, pilot, rows, searches, early);
    int sampleRows = Math.min(settings.collinearity().spearmanRows(),
        Math.max(1_000, VALUE_BUDGET / Math.max(1, sampled.length)));
    ProfileAccumulator proto = new ProfileAccumulator(layout, validity, first, sampled, sampleRows,
        ProfileAccumulator.sampleCut(sampleRows, rows), early == null ? null : early.treatment, tally);
    JavaRDD<ProfileAccumulator> parts = batches.isPresent()
        ? RowScan.batchParts(batches.get(), proto::emptyCopy, ProfileAccumulator::addBatch)
        : RowScan.parts(RowScan.rows(data, layout.projection()), proto::emptyCopy);
    List<KeptRows> kept = new ArrayList<>();
    ProfileAccumulator acc = proto.early != null
        ? KeptRows.run(parts, proto::emptyCopy, kept)
        : RowScan.merged(parts, proto::emptyCopy);
    // Each column's order statistics selected from its held values, columns side by side on the
    // driver's cores (each search and its windows belong to one column).
    java.util.stream.IntStream.range(0, measured.length).parallel()
        .forEach(j -> searches.get(j).absorb(acc.windows[j]));
    List<SearchPass.Target> targets = new ArrayList<>();
    for (int j = 0; j < measured.length; j++) {
      targets.add(new SearchPass.Target(j, validity[j], false, Double.NaN));
    }
    SearchPass.complete(numeric, targets, searches, List.of());
    List<String> all = new ArrayList<>(grouped);
    all.addAll(groupedText);
    GroupMeasures groups = all.isEmpty() ? null
        : tally == null ? GroupMeasures.none(settings.groups().by(), all,
            "the pilot showed more groups, or wider windows, than pass 1 holds")
        : acc.groups.finish(settings.groups().by(), grouped.toArray(new String[0]),
            groupedText.toArray(new String[0]), settings.groups().minValues());
    if (tally != null && !acc.groups.overflowed) {
      groups = settleLeft(numeric, acc.groups, groups, grouped, layout, measured, validity, taken, settings);
    }
    GroupKeys keys = tally == null ? null : new GroupKeys(groups, acc.groups.hashes(), taken.keys(), measured.length,
        settings.groups().minValues());
    double[] mad = mads(numeric, layout, measured, settings, validity, searches, pilot, rows, keys);
    Map<String, double[]> pilotByName = new LinkedHashMap<>();
    Map<String, RankSearch> quartiles = new LinkedHashMap<>();
    for (int j = 0; j < measured.length; j++) {
      pilotByName.put(layout.names[measured[j]], pilot[j]);
      quartiles.put(layout.names[measured[j]], searches.get(j));
    }
    List<String> sampleNames = new ArrayList<>();
    for (int s : sampled) {
      sampleNames.add(layout.names[measured[s]]);
    }
    PassOneShare share = early == null ? null : new PassOneShare(List.copyOf(pilotByName.keySet()),
        acc.windows, acc.moments, List.copyOf(sampleNames),
        acc.early == null ? null : acc.early.comoments,
        acc.early == null ? null : acc.early.actions(), acc.early == null ? null : acc.early.bands(),
        kept.isEmpty() ? null : kept.get(0), acc.early != null && acc.early.overflowed);
    Map<String, Long> pilotDistinct = new LinkedHashMap<>();
    for (int j = 0; j < measured.length && pilot[0].length > 0; j++) {
      pilotDistinct.put(layout.names[measured[j]], distinct(usable[j]));
    }
    return new TableProfile(acc.rows, columns(data.sparkSession(), layout, acc, quartiles, mad),
        sampleNames, acc.sample, pilotByName, quartiles, share, acc.trackedNames(), acc.together, groups,
        pilotDistinct);
  }

  /**
   * The measured columns that may get group-wise figures, in table order (none without
   * groups.by): treated, not key columns, with outlier limits or a median, mean or mode fill (a
   * group's MAD is found in the MAD pass; its mode is read off pass 1's counts). The plan may still
   * leave some untreated; measuring them costs pass 1 a little, never a pass.
   */
  static List<String> groupCandidates(ProfileLayout layout, Settings settings) {
    List<String> out = new ArrayList<>();
    if (!settings.groups().any()) {
      return out;
    }
    for (int i : layout.measuredColumns()) {
      String name = layout.names[i];
      Role role = layout.roles[i];
      if (settings.groups().by().contains(name)) {
        continue;
      }
      ColumnSettings cs = settings.column(name);
      boolean limits = cs.outliers().method() != OutlierMethod.NONE;
      ImputeStrategy strategy = cs.missing().strategy();
      boolean fill = strategy == ImputeStrategy.MEDIAN
          || strategy == ImputeStrategy.MEAN || strategy == ImputeStrategy.MODE;
      if ((role == Role.TREAT || role == Role.REQUIRED) && (limits || fill)) {
        out.add(name);
      }
    }
    return out;
  }

  /**
   * The categorical columns that may get group-wise modes, in table order (none without
   * groups.by): treated, not key columns, filled by the mode (any strategy but none and constant).
   */
  static List<String> groupTextCandidates(ProfileLayout layout, Settings settings) {
    List<String> out = new ArrayList<>();
    if (!settings.groups().any()) {
      return out;
    }
    for (int i : layout.categorical) {
      String name = layout.names[i];
      ImputeStrategy strategy = settings.column(name).missing().strategy();
      if (layout.roles[i] == Role.TREAT && !settings.groups().by().contains(name)
          && strategy != ImputeStrategy.NONE && strategy != ImputeStrategy.CONSTANT) {
        out.add(name);
      }
    }
    return out;
  }

  /**
   * The group quartiles pass 1 left unfound (a group its pilot did not include, a window that
   * missed, windows beyond the memory budget), searched in plain-Java passes over the numeric
   * projection, one search per group and column read only in its group's rows: as the table-wide
   * search continues, exact, usually in one pass. Columns with more group searches than
   * {@value #MAX_GROUP_TARGETS} are left to the grouped search after the plan.
   */
  private static GroupMeasures settleLeft(Supplier<JavaRDD<InternalRow>> numeric, GroupTally tally,
      GroupMeasures groups, List<String> grouped, ProfileLayout layout, int[] measured,
      NumericSteps[] validity, RowScan.Pilot pilot, Settings settings) {
    int minValues = settings.groups().minValues();
    List<SearchPass.Target> targets = new ArrayList<>();
    List<String> names = new ArrayList<>();
    List<GroupTally.Part> parts = new ArrayList<>();
    Map<String, List<GroupTally.Part>> left = new LinkedHashMap<>();
    for (int c = 0; c < grouped.size(); c++) {
      String name = grouped.get(c);
      if (!groups.unsettled().containsKey(name)) {
        continue;
      }
      int j = measuredIndex(layout, measured, name);
      List<GroupTally.Part> all = tally.parts(c);
      List<GroupTally.Part> own = all.stream().filter(p -> p.moments().count() >= minValues).toList();
      if (targets.size() + own.size() > MAX_GROUP_TARGETS) {
        continue;
      }
      left.put(name, all);
      for (GroupTally.Part p : own) {
        targets.add(new SearchPass.Target(j, validity[j], false, Double.NaN, layout.measured, p.hash()));
        names.add(name);
        parts.add(p);
      }
    }
    if (left.isEmpty()) {
      return groups;
    }
    int perWindow = settings.quantiles().heldPerWindow(QUARTILES.length * Math.max(1, targets.size()));
    List<RankSearch> searches = new ArrayList<>();
    List<OrderWindows> first = new ArrayList<>();
    for (int t = 0; t < targets.size(); t++) {
      GroupTally.Part p = parts.get(t);
      RankSearch search = new RankSearch(QUARTILES, perWindow);
      if (p.windows() != null) {
        // Pass 1's windows missed: the search goes on from their counts.
        search.absorb(p.windows());
        first.add(null);
      } else {
        SearchPass.Target target = targets.get(t);
        first.add(search.firstPlan(target.pilotValues(pilot.values()[target.at()], pilot.keys()), p.moments().count()));
      }
      searches.add(search);
    }
    SearchPass.complete(numeric, targets, searches, first);
    Map<String, Map<Long, double[]>> found = new HashMap<>();
    for (int t = 0; t < targets.size(); t++) {
      found.computeIfAbsent(names.get(t), k -> new HashMap<>()).put(parts.get(t).hash(), searches.get(t).quantiles());
    }
    Map<String, Map<List<String>, GroupMeasures.Measure>> columns = new LinkedHashMap<>(groups.columns());
    Map<String, String> unsettled = new LinkedHashMap<>(groups.unsettled());
    for (Map.Entry<String, List<GroupTally.Part>> e : left.entrySet()) {
      String name = e.getKey();
      Map<List<String>, GroupMeasures.Measure> byKey = new LinkedHashMap<>();
      for (GroupTally.Part p : e.getValue()) {
        // A group with too few values has no search: NaN quartiles, as in pass 1.
        double[] q = found.getOrDefault(name, Map.of()).getOrDefault(p.hash(),
            new double[] {Double.NaN, Double.NaN, Double.NaN});
        ScaledMoments m = p.moments();
        byKey.put(p.key(), new GroupMeasures.Measure(m.count(), m.mean(), m.stddev(), q));
      }
      columns.put(name, byKey);
      unsettled.remove(name);
    }
    return new GroupMeasures(groups.by(), columns, groups.modes(), unsettled);
  }

  /** The position among the measured columns (projection order) of the column {@code name}. */
  private static int measuredIndex(ProfileLayout layout, int[] measured, String name) {
    for (int j = 0; j < measured.length; j++) {
      if (layout.names[measured[j]].equals(name)) {
        return j;
      }
    }
    throw new IllegalArgumentException("No measured column " + name);
  }

  /** The group tally of pass 1 over the columns in {@code grouped} and {@code groupedText}, or null. */
  private static GroupTally groupTally(ProfileLayout layout, int[] measured, NumericSteps[] validity,
      List<String> grouped, List<String> groupedText, RowScan.Pilot pilot, long rows, Settings settings) {
    List<Integer> cols = new ArrayList<>();
    List<NumericSteps> steps = new ArrayList<>();
    for (String name : grouped) {
      int j = measuredIndex(layout, measured, name);
      cols.add(j);
      steps.add(validity[j]);
    }
    int[] text = groupedText.stream().mapToInt(name -> java.util.Arrays.asList(layout.names).indexOf(name)).toArray();
    dev.sluice.config.OutlierSettings[] outliers = new dev.sluice.config.OutlierSettings[cols.size()];
    boolean[] countValues = new boolean[cols.size()];
    for (int c = 0; c < outliers.length; c++) {
      ColumnSettings cs = settings.column(layout.names[measured[cols.get(c)]]);
      outliers[c] = cs.outliers();
      countValues[c] = cs.missing().strategy() == ImputeStrategy.MODE;
    }
    return GroupTally.plan(layout, cols.stream().mapToInt(Integer::intValue).toArray(),
        steps.toArray(new NumericSteps[0]), outliers, countValues, text, pilot, rows, settings.groups().maxGroups(),
        settings.quantiles().maxHeldValues()).orElse(null);
  }

  /** Each measured column's quartile search, and the windows of its first pass. */
  private static OrderWindows[] firstWindows(int perWindow, double[][] sortedUsable,
      double[][] pilot, long rows, List<RankSearch> searches, EarlySetup early) {
    OrderWindows[] first = new OrderWindows[sortedUsable.length];
    for (int j = 0; j < sortedUsable.length; j++) {
      double[] usable = sortedUsable[j];
      RankSearch search = new RankSearch(QUARTILES, perWindow);
      first[j] = search.firstPlan(usable, expected(rows, usable.length, pilot[j].length),
          early == null ? List.of() : early.cover.get(j));
      searches.add(search);
    }
    return first;
  }

  /** Every column's profile, in table order. */
  private static List<ColumnProfile> columns(SparkSession spark, ProfileLayout layout,
      ProfileAccumulator acc, Map<String, RankSearch> quartiles, double[] mad) {
    String[] texts = temporalTexts(spark, layout, acc);
    List<ColumnProfile> columns = new ArrayList<>();
    int j = 0;
    for (int i = 0; i < layout.names.length; i++) {
      if (layout.reads[i] == ProfileLayout.Read.MEASURED) {
        columns.add(measuredProfile(layout, i, acc, j, quartiles.get(layout.names[i]).quantiles(), mad[j]));
        j++;
      } else {
        columns.add(otherProfile(layout, i, acc, texts[2 * i], texts[2 * i + 1]));
      }
    }
    return List.copyOf(columns);
  }

  private static Double boxed(java.util.OptionalDouble d) {
    return d.isPresent() ? d.getAsDouble() : null;
  }

  /**
   * Partitions the pilot reads. Its first rows cost the read of a partition's first row group
   * (Parquet and ORC read a row group's column chunks whole), so without groups the pilot reads
   * as many partitions as the cluster runs tasks at once (Spark's default parallelism: its cores,
   * unless spark.default.parallelism says otherwise), at least 2 and at most {@link
   * #PILOT_PARTITIONS}: one wave of tasks. With groups.by it reads up to {@link #PILOT_PARTITIONS}, to
   * meet as many groups as it can (a table partitioned by the group key has one group per
   * partition).
   */
  static int pilotPartitions(Dataset<Row> data, boolean grouped) {
    int wave = data.sparkSession().sparkContext().defaultParallelism();
    return grouped ? PILOT_PARTITIONS : Math.max(2, Math.min(PILOT_PARTITIONS, wave));
  }

  /**
   * The pilot rows: read by the driver from the first pages of a few row groups of a plain
   * Parquet read's files ({@link ParquetPilot}) where it can, else by a Spark job over the first
   * rows of a few partitions ({@link RowScan#pilot}), which also reads the group keys.
   */
  private static RowScan.Pilot pilot(Dataset<Row> data, Optional<ParquetFooters.Files> files,
      Supplier<JavaRDD<InternalRow>> numeric, ProfileLayout layout, int[] measured, Settings settings) {
    int wanted = pilotRows(settings, measured.length);
    int parts = pilotPartitions(data, layout.keyAt >= 0);
    // With field IDs, Spark matches a file's columns by ID, not by the names read here.
    boolean byName = !data.sparkSession().sessionState().conf().parquetFieldIdReadEnabled();
    if (layout.keyAt < 0 && byName && files.isPresent() && files.get().asStored()) {
      List<String> names = new ArrayList<>();
      List<DataType> types = new ArrayList<>();
      for (int i : measured) {
        names.add(layout.names[i]);
        types.add(layout.rawTypes[i]);
      }
      Optional<double[][]> read = ParquetPilot.read(files.get(), names, types, wanted, parts);
      if (read.isPresent()) {
        return new RowScan.Pilot(read.get(), new long[0]);
      }
    }
    return RowScan.pilot(numeric.get(), measured.length, layout.keyAt >= 0 ? measured.length : -1, wanted,
        parts);
  }

  /** {@code make}'s value, made on the first call only. */
  static <T> Supplier<T> memoized(Supplier<T> make) {
    return new Supplier<>() {
      private T value;

      @Override
      public synchronized T get() {
        if (value == null) {
          value = make.get();
        }
        return value;
      }
    };
  }

  /** The number of distinct values in a sorted array (-0.0 and 0.0 as one). */
  static long distinct(double[] sorted) {
    long n = 0;
    for (int i = 0; i < sorted.length; i++) {
      n += i == 0 || sorted[i] != sorted[i - 1] ? 1 : 0;
    }
    return n;
  }

  /** Pilot rows: the configured number, fewer on wide tables so the pilot stays in budget. */
  static int pilotRows(Settings settings, int columns) {
    return Math.max(1_000, Math.min(settings.quantiles().pilotRows(), VALUE_BUDGET / Math.max(1, columns)));
  }

  /** The pilot's values that pass the validity step. */
  static double[] usable(double[] raw, NumericSteps steps) {
    double[] out = new double[raw.length];
    int n = 0;
    for (double x : raw) {
      double v = steps.valid(x);
      if (!Double.isNaN(v)) {
        out[n++] = v;
      }
    }
    return java.util.Arrays.copyOf(out, n);
  }

  /** About how many usable values a column holds, from the pilot's share of them. */
  static long expected(long rows, int usable, int pilot) {
    return pilot == 0 ? rows : (long) Math.ceil((double) rows * usable / pilot);
  }

  /** Treated measured columns the row sample holds, when the correlation analysis will run. */
  private static int[] sampledColumns(ProfileLayout layout, int[] measured, Settings settings) {
    List<Integer> out = new ArrayList<>();
    for (int j = 0; j < measured.length; j++) {
      Role r = layout.roles[measured[j]];
      if (r == Role.TREAT || r == Role.REQUIRED) {
        out.add(j);
      }
    }
    boolean analysed = settings.collinearity().enabled() && out.size() >= 2
        && out.size() <= settings.collinearity().maxColumns();
    return analysed ? out.stream().mapToInt(Integer::intValue).toArray() : new int[0];
  }

  /**
   * What the MAD pass needs to find each group's MAD too: pass 1's group figures (whose MADs it
   * fills in), each group's key hash, the pilot rows' key hashes, where the pass reads a row's key,
   * and the fewest values a group needs for figures of its own.
   */
  private record GroupKeys(GroupMeasures groups, Map<List<String>, Long> hashes, long[] pilotKeys, int keyAt,
      int minValues) {}

  /** Most (group, column) MAD searches the MAD pass takes on; more are left to the search after the plan. */
  static final int MAX_GROUP_TARGETS = 2_000;

  /**
   * The MAD of every treated column whose outlier method is mad: one more pass, shared, over the
   * distances of the valid values from the column's exact median, which also finds each group's
   * MAD ({@code keys}; null without groups). NaN for the other columns.
   */
  private static double[] mads(Supplier<JavaRDD<InternalRow>> numeric, ProfileLayout layout, int[] measured,
      Settings settings, NumericSteps[] validity, List<RankSearch> quartiles, double[][] pilot, long rows,
      GroupKeys keys) {
    double[] out = new double[measured.length];
    java.util.Arrays.fill(out, Double.NaN);
    List<Integer> cols = new ArrayList<>();
    for (int j = 0; j < measured.length; j++) {
      Role role = layout.roles[measured[j]];
      boolean treated = role == Role.TREAT || role == Role.REQUIRED;
      boolean mad = settings.column(layout.names[measured[j]]).outliers().method() == OutlierMethod.MAD;
      if (treated && mad && !Double.isNaN(quartiles.get(j).quantiles()[1])) {
        cols.add(j);
      }
    }
    // Each group's MAD, from the distances to the group's own median, in the same pass.
    List<SearchPass.Target> groupTargets = new ArrayList<>();
    List<List<String>> groupKeys = new ArrayList<>();
    List<String> groupColumns = new ArrayList<>();
    for (int j : cols) {
      String name = layout.names[measured[j]];
      Map<List<String>, GroupMeasures.Measure> byKey = keys == null ? null : keys.groups().columns().get(name);
      if (byKey == null) {
        continue;
      }
      byKey.forEach((key, m) -> {
        if (m.usable() >= keys.minValues() && !Double.isNaN(m.quartiles()[1])) {
          groupTargets.add(new SearchPass.Target(j, validity[j], false, m.quartiles()[1], keys.keyAt(),
              keys.hashes().get(key)));
          groupKeys.add(key);
          groupColumns.add(name);
        }
      });
    }
    if (groupTargets.size() > MAX_GROUP_TARGETS) {
      groupTargets.clear();
    }
    int perWindow = settings.quantiles().heldPerWindow(cols.size() + groupTargets.size());
    List<SearchPass.Target> targets = new ArrayList<>();
    List<RankSearch> searches = new ArrayList<>();
    List<OrderWindows> first = new ArrayList<>();
    for (int k = 0; k < groupTargets.size(); k++) {
      SearchPass.Target t = groupTargets.get(k);
      RankSearch search = new RankSearch(new double[] {0.5}, perWindow);
      long usable = keys.groups().columns().get(groupColumns.get(k)).get(groupKeys.get(k)).usable();
      first.add(search.firstPlan(t.pilotValues(pilot[t.at()], keys.pilotKeys()), usable));
      targets.add(t);
      searches.add(search);
    }
    for (int j : cols) {
      SearchPass.Target t = new SearchPass.Target(j, validity[j], false, quartiles.get(j).quantiles()[1]);
      double[] distances = t.pilotValues(pilot[j], null);
      RankSearch search = new RankSearch(new double[] {0.5}, perWindow);
      first.add(search.firstPlan(distances, expected(rows, distances.length, pilot[j].length)));
      targets.add(t);
      searches.add(search);
    }
    SearchPass.complete(numeric, targets, searches, first);
    int g = groupTargets.size();
    for (int k = 0; k < g; k++) {
      Map<List<String>, GroupMeasures.Measure> byKey = keys.groups().columns().get(groupColumns.get(k));
      byKey.put(groupKeys.get(k), byKey.get(groupKeys.get(k)).withMad(searches.get(k).quantiles()[0]));
    }
    for (int k = 0; k < cols.size(); k++) {
      out[cols.get(k)] = searches.get(g + k).quantiles()[0];
    }
    return out;
  }

  private static ColumnProfile measuredProfile(ProfileLayout layout, int i, ProfileAccumulator acc, int j,
      double[] q, double mad) {
    ScaledMoments m = new ScaledMoments();
    for (ScaledMoments region : acc.moments[j]) {
      m.merge(region);
    }
    long usable = m.count();
    return new ColumnProfile(layout.names[i], layout.types[i], ColumnKind.NUMERIC, layout.roles[i], acc.rows,
        acc.rows - acc.present[i], acc.nan[j], acc.infinite[j], acc.invalid[j], usable,
        m.min(), m.max(), m.mean(), m.stddev(), q[0], q[1], q[2],
        ColumnProfile.EXACT_TYPE7, 0.0, mad, -1, null, 0, null, null);
  }

  private static ColumnProfile otherProfile(ProfileLayout layout, int i, ProfileAccumulator acc,
      String earliest, String latest) {
    String top = null;
    long topCount = 0;
    if (acc.values[i] != null && acc.values[i].top() != null) {
      top = acc.values[i].top().toString();
      topCount = acc.values[i].topCount();
    }
    long distinct = acc.distinct[i] == null ? -1 : acc.distinct[i].estimate();
    return new ColumnProfile(layout.names[i], layout.types[i], layout.kinds[i], layout.roles[i], acc.rows,
        acc.rows - acc.present[i], 0, 0, 0, 0, Double.NaN, Double.NaN, Double.NaN, Double.NaN,
        Double.NaN, Double.NaN, Double.NaN, null, Double.NaN, Double.NaN, distinct, top, topCount,
        earliest, latest);
  }

  /**
   * The earliest and latest value of every date and timestamp column as text, cast by Spark
   * itself (session time zone, Spark's own format) from literals: no data is read.
   */
  private static String[] temporalTexts(SparkSession spark, ProfileLayout layout, ProfileAccumulator acc) {
    String[] out = new String[2 * layout.names.length];
    List<Column> casts = new ArrayList<>();
    List<Integer> where = new ArrayList<>();
    for (int i = 0; i < layout.names.length; i++) {
      ProfileLayout.Read read = layout.reads[i];
      boolean temporal = read == ProfileLayout.Read.DATE || read == ProfileLayout.Read.TIMESTAMP
          || read == ProfileLayout.Read.LOCAL_TIMESTAMP;
      if (!temporal || acc.present[i] == 0) {
        continue;
      }
      casts.add(literal(read, acc.earliest[i]).cast("string"));
      casts.add(literal(read, acc.latest[i]).cast("string"));
      where.add(i);
    }
    if (where.isEmpty()) {
      return out;
    }
    Row r = spark.range(1).select(casts.toArray(new Column[0])).first();
    int f = 0;
    for (int i : where) {
      out[2 * i] = r.getString(f++);
      out[2 * i + 1] = r.getString(f++);
    }
    return out;
  }

  /** Spark's internal value of a date (days) or timestamp (microseconds) as a typed literal. */
  private static Column literal(ProfileLayout.Read read, long v) {
    switch (read) {
      case DATE:
        return functions.lit(LocalDate.ofEpochDay(v));
      case TIMESTAMP:
        return functions.lit(Instant.EPOCH.plus(v, ChronoUnit.MICROS));
      default:
        return functions.lit(LocalDateTime.ofEpochSecond(Math.floorDiv(v, 1_000_000L),
            (int) Math.floorMod(v, 1_000_000L) * 1000, ZoneOffset.UTC));
    }
  }
}
