package aislecast.core.sim;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;
import java.util.List;
import java.util.Map;

/**
 * Deterministic JSON text for truth.json: maps keep insertion order, doubles print from their
 * exact binary value rounded to 15 significant digits (independent of the JDK's shortest-digit
 * algorithm), {@link Fixed} prints a fixed number of decimals, and lists of scalars go on one line.
 * Write-only on purpose: core has no JSON library and needs nothing more.
 */
final class Json {
  private static final MathContext DIGITS = new MathContext(15, RoundingMode.HALF_EVEN);

  private Json() {}

  /** A double printed with a fixed number of decimals. */
  record Fixed(double value, int decimals) {}

  static String write(Object value) {
    StringBuilder sb = new StringBuilder(1 << 16);
    write(sb, value, 0);
    sb.append('\n');
    return sb.toString();
  }

  private static void write(StringBuilder sb, Object v, int indent) {
    if (v instanceof Map<?, ?> map) {
      if (map.isEmpty()) {
        sb.append("{}");
        return;
      }
      sb.append("{\n");
      int i = 0;
      for (Map.Entry<?, ?> e : map.entrySet()) {
        pad(sb, indent + 1);
        string(sb, String.valueOf(e.getKey()));
        sb.append(": ");
        write(sb, e.getValue(), indent + 1);
        sb.append(++i < map.size() ? ",\n" : "\n");
      }
      pad(sb, indent);
      sb.append('}');
    } else if (v instanceof List<?> list) {
      boolean flat = list.stream().noneMatch(x -> x instanceof Map || x instanceof List);
      if (flat) {
        sb.append('[');
        for (int i = 0; i < list.size(); i++) {
          if (i > 0) {
            sb.append(", ");
          }
          write(sb, list.get(i), indent);
        }
        sb.append(']');
        return;
      }
      sb.append("[\n");
      for (int i = 0; i < list.size(); i++) {
        pad(sb, indent + 1);
        write(sb, list.get(i), indent + 1);
        sb.append(i + 1 < list.size() ? ",\n" : "\n");
      }
      pad(sb, indent);
      sb.append(']');
    } else if (v instanceof String s) {
      string(sb, s);
    } else if (v instanceof Double d) {
      sb.append(number(d));
    } else if (v instanceof Fixed f) {
      sb.append(DemandSimulator.fixed(f.value(), f.decimals()));
    } else if (v instanceof Integer || v instanceof Long || v instanceof Boolean) {
      sb.append(v);
    } else if (v == null) {
      sb.append("null");
    } else {
      throw new IllegalArgumentException("no JSON form for " + v.getClass());
    }
  }

  static String number(double d) {
    if (!Double.isFinite(d)) {
      throw new IllegalArgumentException("JSON has no non-finite numbers: " + d);
    }
    if (d == 0.0) {
      return "0";
    }
    BigDecimal b = new BigDecimal(d).round(DIGITS).stripTrailingZeros();
    int exponent = b.precision() - b.scale() - 1;
    return exponent < -6 || exponent > 15 ? b.toString() : b.toPlainString();
  }

  private static void string(StringBuilder sb, String s) {
    sb.append('"');
    for (int i = 0; i < s.length(); i++) {
      char c = s.charAt(i);
      switch (c) {
        case '"' -> sb.append("\\\"");
        case '\\' -> sb.append("\\\\");
        case '\n' -> sb.append("\\n");
        case '\r' -> sb.append("\\r");
        case '\t' -> sb.append("\\t");
        default -> {
          if (c < 0x20) {
            sb.append(String.format("\\u%04x", (int) c));
          } else {
            sb.append(c);
          }
        }
      }
    }
    sb.append('"');
  }

  private static void pad(StringBuilder sb, int indent) {
    sb.append("  ".repeat(indent));
  }
}
