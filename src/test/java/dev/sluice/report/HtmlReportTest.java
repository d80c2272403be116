package dev.sluice.report;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.config.Settings;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.io.StringReader;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import javax.xml.parsers.DocumentBuilderFactory;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.w3c.dom.Document;
import org.w3c.dom.Element;
import org.w3c.dom.NodeList;
import org.xml.sax.InputSource;

/**
 * The report's figures sit at the profile's values (geometry worked out by hand below), its texts
 * are escaped, and it stays one usable file for a wide table.
 */
@ExtendWith(SharedSpark.class)
class HtmlReportTest {
  private static Document parse(String svg) throws Exception {
    return DocumentBuilderFactory.newInstance().newDocumentBuilder()
        .parse(new InputSource(new StringReader("<svg>" + svg + "</svg>")));
  }

  private static double attr(Element e, String name) {
    return Double.parseDouble(e.getAttribute(name));
  }

  @Test
  void boxAndWhiskersSitAtTheProfileValues() throws Exception {
    // Scale 0..100 onto pixels 100..500: x(v) = 100 + 4 v (by hand). Q1 25 -> 200, median 40 ->
    // 260, Q3 60 -> 340. The low fence -27.5 lies below the smallest value 5, so the low whisker
    // stops at 5 -> 120; the high fence 90 lies below the largest value 95, so the high whisker
    // stops at 90 -> 460, with 7 values above it up to 95 -> 480.
    BoxPlot p = BoxPlot.of("before", 5, 25, 40, 60, 95, -27.5, 90.0, 0, 7);
    assertThat(p.low()).isEqualTo(5);
    assertThat(p.high()).isEqualTo(90);
    Document d = parse(p.svg(new BoxPlot.Scale(0, 100, 100, 500), 50, "before"));
    Element box = (Element) d.getElementsByTagName("rect").item(0);
    assertThat(attr(box, "x")).isEqualTo(200.0);
    assertThat(attr(box, "width")).isEqualTo(140.0);
    assertThat(attr(box, "y")).isEqualTo(42.0);
    assertThat(attr(box, "height")).isEqualTo(16.0);
    NodeList lines = d.getElementsByTagName("line");
    List<String> whiskers = new ArrayList<>();
    double median = Double.NaN;
    for (int i = 0; i < lines.getLength(); i++) {
      Element l = (Element) lines.item(i);
      if (l.getAttribute("class").equals("median")) {
        median = attr(l, "x1");
      } else {
        whiskers.add(attr(l, "x1") + "-" + attr(l, "x2"));
      }
    }
    assertThat(median).isEqualTo(260.0);
    assertThat(whiskers).containsExactlyInAnyOrder("120.0-200.0", "340.0-460.0", "120.0-120.0", "460.0-460.0");
    Element mark = (Element) d.getElementsByTagName("circle").item(0);
    assertThat(attr(mark, "cx")).isEqualTo(480.0);
    assertThat(d.getDocumentElement().getTextContent()).contains("7 above").doesNotContain("below");
  }

  @Test
  void scalesCoverTheWhiskersAndPinWhatLiesBeyond() {
    BoxPlot a = BoxPlot.of("before", 0, 10, 20, 30, 1000, -20.0, 60.0, 0, 3);
    BoxPlot b = BoxPlot.of("after", 0, 10, 20, 30, 60, -20.0, 60.0, 0, 0);
    BoxPlot.Scale s = BoxPlot.Scale.covering(List.of(a, b), 0, 100);
    // Whiskers 0..60, padded by 8 % of 60 = 4.8 each side (by hand).
    assertThat(s.from()).isCloseTo(-4.8, within(1e-12));
    assertThat(s.to()).isCloseTo(64.8, within(1e-12));
    assertThat(s.x(1000)).isEqualTo(100.0);
    assertThat(s.inside(1000)).isFalse();
    BoxPlot.Scale single = BoxPlot.Scale.covering(List.of(BoxPlot.of("c", 7, 7, 7, 7, 7, 7.0, 7.0, 0, 0)), 0, 100);
    assertThat(single.from()).isEqualTo(6.3);
    assertThat(single.x(7)).isCloseTo(50.0, within(1e-9));
  }

  @Test
  void countsBeyondTheFencesAfterTheOutlierStep() {
    // Limits at the inner fence: capped or removed, none stay beyond it.
    assertThat(HtmlReport.beyondAfter("cap", 10.0, 10.0, 40, 40, true)).isZero();
    assertThat(HtmlReport.beyondAfter("set-missing", 90.0, 90.0, 40, 40, false)).isZero();
    // Limits at the outer fence: those between the fences stay; capped ones sit at the outer fence.
    assertThat(HtmlReport.beyondAfter("cap", 10.0, 0.0, 40, 15, true)).isEqualTo(40);
    assertThat(HtmlReport.beyondAfter("quarantine", 10.0, 0.0, 40, 15, true)).isEqualTo(25);
    assertThat(HtmlReport.beyondAfter("flag", 10.0, 10.0, 40, 40, true)).isEqualTo(40);
    assertThat(HtmlReport.beyondAfter("cap", 10.0, null, 40, 0, true)).isEqualTo(40);
  }

  @Test
  void heatmapColoursAndCellsAreReadable() {
    assertThat(HtmlReport.colour(0)).isEqualTo("#f2f2f2");
    assertThat(HtmlReport.colour(1)).isEqualTo("#c25a0b");
    assertThat(HtmlReport.colour(-1)).isEqualTo("#1f5fa8");
    assertThat(HtmlReport.colour(Double.NaN)).isEqualTo("#9a9a9a");
    assertThat(HtmlReport.cellText(-0.001)).isEqualTo("0.00");
    assertThat(HtmlReport.cellText(-0.91246)).isEqualTo("-0.91");
  }

  private static String report(Dataset<Row> data, Settings settings) {
    Sluice.Fit fit = Sluice.fit(data, settings, List.of());
    Map<String, Object> record = new LinkedHashMap<>();
    record.put("command", "survey");
    record.put("input", Map.of("path", "/lake/<b>checks</b>", "format", "parquet"));
    record.put("rows", Map.of("read", fit.profile().rows()));
    return HtmlReport.render(new HtmlReport.Inputs(record, fit.profile(), fit.plan(), fit.stats(), settings,
        List.of("columns.\"<script>alert(1)</script>\".valid-min = 0")));
  }

  @Test
  void everyTextFromDataOrConfigIsEscaped(SparkSession spark) {
    String hostile = "<script>alert(1)</script>";
    Dataset<Row> data = spark.range(400).select(
        functions.expr("CAST(id % 37 AS DOUBLE)").as(hostile),
        functions.expr("CAST(id * 3 % 101 AS DOUBLE)").as("plain \"quoted\" & 'single'"));
    String html = report(data, Fixtures.settings());
    assertThat(html).doesNotContain("<b>checks")
        .contains("&lt;script&gt;alert(1)&lt;/script&gt;")
        .contains("plain &quot;quoted&quot; &amp; &#39;single&#39;");
    // One self-contained file: nothing to fetch, no script, every section present.
    assertThat(html).doesNotContain("http://").doesNotContain("https://").doesNotContain("src=")
        .doesNotContainIgnoringCase("<script").doesNotContain("@import").doesNotContain("url(");
    for (String id : List.of("cautions", "run", "columns", "missing", "collinearity")) {
      assertThat(html).contains("<section id=\"" + id + "\">");
    }
    assertThat(html).contains("not a system of record").contains("qualified person")
        .contains("only read, never modified");
  }

  @Test
  void quartilesAfterRemovalAreNotGuessed(SparkSession spark) {
    // Values set missing by the outlier step change the quartiles; with mean filling nothing
    // measures them, so the "after" row says so instead of drawing a box.
    Dataset<Row> data = spark.range(500).select(
        functions.expr("CASE WHEN id % 50 = 0 THEN 1000.0 ELSE CAST(id % 40 AS DOUBLE) END").as("load"));
    String removed = report(data, Fixtures.settings("defaults.outliers.action=set-missing",
        "defaults.missing.strategy=mean"));
    assertThat(removed).contains("quartiles not computed (values from 0 to 39)");
    // Capping keeps the values' order: the quartiles follow from the profile, and the box is drawn.
    String capped = report(data, Fixtures.settings("defaults.missing.strategy=mean"));
    assertThat(capped).doesNotContain("quartiles not computed");
    assertThat(capped.split("class=\"box\"", -1)).hasSize(3);
  }

  @Test
  void fiveHundredColumnsGiveAUsableFileUnderTenMegabytes(SparkSession spark) {
    List<Column> cols = new ArrayList<>();
    for (int i = 0; i < 500; i++) {
      cols.add(functions.expr("CAST((id * " + (i + 7) + ") % 97 AS DOUBLE) + rand(" + i + ")").as("m" + i));
    }
    Dataset<Row> data = spark.range(600).select(cols.toArray(new Column[0]));
    String html = report(data, Fixtures.settings("collinearity.max-columns=500"));
    int bytes = html.getBytes(StandardCharsets.UTF_8).length;
    assertThat(bytes).isLessThan(10_000_000);
    // Column blocks start closed; the heatmaps keep to their most correlated columns.
    assertThat(html).contains("<details class=\"column\"><summary>").doesNotContain("<details class=\"column\" open>");
    assertThat(html).contains("The heatmaps show the " + HtmlReport.HEATMAP_COLUMNS + " columns");
  }
}
