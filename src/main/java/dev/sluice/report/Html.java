package dev.sluice.report;

import java.math.BigDecimal;
import java.math.MathContext;
import java.util.Locale;
import org.apache.commons.text.StringEscapeUtils;

/** Escaping and number formatting for the HTML report: every text from data or config goes through {@link #esc}. */
final class Html {
  private Html() {}

  /** Text as HTML character data or a double-quoted attribute value (escapes &lt; &gt; &amp; " '). */
  static String esc(Object text) {
    if (text == null) {
      return "";
    }
    return StringEscapeUtils.escapeHtml4(String.valueOf(text)).replace("'", "&#39;");
  }

  /** A number for people: five significant digits, plain notation where it stays short. */
  static String num(double v) {
    if (Double.isNaN(v)) {
      return "–";
    }
    if (Double.isInfinite(v)) {
      return v > 0 ? "∞" : "−∞";
    }
    if (v == 0) {
      return "0";
    }
    double a = Math.abs(v);
    if (a >= 1e-4 && a < 1e9) {
      return new BigDecimal(v).round(new MathContext(5)).stripTrailingZeros().toPlainString();
    }
    return String.format(Locale.ROOT, "%.4e", v);
  }

  static String num(Double v) {
    return v == null ? "–" : num(v.doubleValue());
  }

  /** A share as a percentage with one decimal. */
  static String pct(double share) {
    return Double.isNaN(share) ? "–" : String.format(Locale.ROOT, "%.1f %%", 100 * share);
  }

  /** A coordinate for SVG: two decimals, no exponent. */
  static String xy(double v) {
    return String.format(Locale.ROOT, "%.2f", v);
  }
}
