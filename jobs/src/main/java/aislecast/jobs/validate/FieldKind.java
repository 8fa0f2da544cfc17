package aislecast.jobs.validate;

import java.math.BigDecimal;
import java.time.LocalDate;
import java.time.format.DateTimeParseException;
import java.util.regex.Pattern;
import org.apache.spark.sql.types.BooleanType;
import org.apache.spark.sql.types.ByteType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.DateType;
import org.apache.spark.sql.types.IntegerType;
import org.apache.spark.sql.types.LongType;
import org.apache.spark.sql.types.NumericType;
import org.apache.spark.sql.types.ShortType;
import org.apache.spark.sql.types.StringType;
import org.apache.spark.sql.types.TimestampNTZType;
import org.apache.spark.sql.types.TimestampType;

/**
 * What one input field holds, how a raw value (text from CSV, or a Parquet value) is parsed, and
 * which Parquet types can hold it. Parsing never throws: a bad value gives a {@link Outcome} with
 * its {@link RejectReason}.
 */
public enum FieldKind {
  /** Identifier (store_id, product_id, owner, region): non-empty text; integers become text. */
  KEY(DataTypes.StringType),
  /** ISO date yyyy-MM-dd, kept as its normalised text until the output stage. */
  WEEK(DataTypes.StringType),
  /** Units sold: whole number >= 0. */
  UNITS(DataTypes.LongType),
  /** Shelf price: finite number > 0. */
  PRICE(DataTypes.DoubleType),
  /** Market size (shoppers): whole number > 0. */
  MARKET_SIZE(DataTypes.LongType),
  /** Numeric attribute, demographic or demand shifter: finite number. */
  NUMBER(DataTypes.DoubleType),
  /** Cost shifter: finite number > 0 (it enters the price equation in logs). */
  POSITIVE_NUMBER(DataTypes.DoubleType),
  /** Shopper draw index: whole number >= 0. */
  DRAW_INDEX(DataTypes.IntegerType);

  private static final Pattern DECIMAL =
      Pattern.compile("[+-]?(\\d+(\\.\\d*)?|\\.\\d+)([eE][+-]?\\d+)?");
  private static final Pattern INTEGER = Pattern.compile("[+-]?\\d+");
  private static final Pattern NON_FINITE =
      Pattern.compile("[+-]?(nan|inf|infinity)", Pattern.CASE_INSENSITIVE);
  /** Whole numbers above 2^53 are not exact as doubles; counts that large are not plausible. */
  private static final double MAX_EXACT = 9.007199254740992E15;

  /** Regex (Java and Spark rlike) for text that reads as a number, finite or not. */
  public static final String NUMERIC_TEXT_REGEX =
      "^\\s*([+-]?(\\d+(\\.\\d*)?|\\.\\d+)([eE][+-]?\\d+)?|[+-]?([Nn][Aa][Nn]|[Ii][Nn][Ff]"
          + "([Ii][Nn][Ii][Tt][Yy])?))\\s*$";

  private final DataType outputType;

  FieldKind(DataType outputType) {
    this.outputType = outputType;
  }

  /** Spark type of the parsed value. */
  public DataType outputType() {
    return outputType;
  }

  /** Whether a Parquet column of type {@code type} can hold this field. */
  public boolean accepts(DataType type) {
    if (type instanceof StringType) {
      return true;
    }
    boolean integral =
        type instanceof ByteType
            || type instanceof ShortType
            || type instanceof IntegerType
            || type instanceof LongType;
    return switch (this) {
      case KEY -> integral;
      case WEEK ->
          type instanceof DateType
              || type instanceof TimestampType
              || type instanceof TimestampNTZType;
      case UNITS, PRICE, MARKET_SIZE, POSITIVE_NUMBER, DRAW_INDEX -> type instanceof NumericType;
      case NUMBER -> type instanceof NumericType || type instanceof BooleanType;
    };
  }

  /** Human description of {@link #accepts} for schema error messages. */
  public String expectedTypes() {
    return switch (this) {
      case KEY -> "text or an integer type";
      case WEEK -> "a date, a timestamp or text yyyy-MM-dd";
      case NUMBER -> "a numeric or boolean type, or text";
      default -> "a numeric type or text";
    };
  }

  /**
   * Parses one raw value.
   *
   * @param raw the value as read (String, a boxed number, or null); not modified
   * @param column source column name, for the message
   */
  public Outcome parse(Object raw, String column) {
    String text = raw == null ? null : raw.toString().trim();
    if (text == null || text.isEmpty()) {
      return this == PRICE
          ? Outcome.reject(RejectReason.MISSING_PRICE, column + " is empty")
          : Outcome.reject(RejectReason.MISSING_VALUE, column + " is empty");
    }
    switch (this) {
      case KEY:
        return Outcome.ok(text);
      case WEEK:
        try {
          return Outcome.ok(LocalDate.parse(text).toString());
        } catch (DateTimeParseException e) {
          return Outcome.reject(
              RejectReason.MALFORMED_WEEK, column + " '" + text + "' is not a date yyyy-MM-dd");
        }
      default:
        break;
    }
    // Numeric kinds: exact integers are kept apart from doubles so counts stay exact.
    Long exact = null;
    double value;
    if (raw instanceof Long || raw instanceof Integer || raw instanceof Short
        || raw instanceof Byte) {
      exact = ((Number) raw).longValue();
      value = exact;
    } else if (raw instanceof BigDecimal bd) {
      value = bd.doubleValue();
      if (bd.stripTrailingZeros().scale() <= 0 && bd.abs().compareTo(BigDecimal.valueOf(Long.MAX_VALUE)) <= 0) {
        exact = bd.longValue();
      }
    } else if (raw instanceof Number n) {
      value = n.doubleValue();
    } else if (raw instanceof Boolean b) {
      value = b ? 1.0 : 0.0;
    } else if (INTEGER.matcher(text).matches()) {
      try {
        exact = Long.parseLong(text.startsWith("+") ? text.substring(1) : text);
        value = exact;
      } catch (NumberFormatException e) {
        return Outcome.reject(
            RejectReason.MALFORMED_NUMBER, column + " '" + text + "' is out of range");
      }
    } else if (DECIMAL.matcher(text).matches()) {
      value = Double.parseDouble(text);
    } else if (NON_FINITE.matcher(text).matches()) {
      return Outcome.reject(
          RejectReason.NON_FINITE_VALUE, column + " '" + text + "' is not a finite number");
    } else {
      return Outcome.reject(
          RejectReason.MALFORMED_NUMBER, column + " '" + text + "' is not a number");
    }
    if (!Double.isFinite(value)) {
      return Outcome.reject(
          RejectReason.NON_FINITE_VALUE, column + " '" + text + "' is not a finite number");
    }
    switch (this) {
      case UNITS:
        if (value < 0) {
          return Outcome.reject(
              RejectReason.NEGATIVE_UNITS, column + " '" + text + "' is negative");
        }
        return whole(exact, value, text, column, RejectReason.NON_INTEGER_UNITS);
      case MARKET_SIZE:
        if (value <= 0) {
          return Outcome.reject(
              RejectReason.NON_POSITIVE_MARKET_SIZE,
              column + " '" + text + "' is not above zero");
        }
        return whole(exact, value, text, column, RejectReason.NON_INTEGER_MARKET_SIZE);
      case DRAW_INDEX: {
        Outcome w = whole(exact, value, text, column, RejectReason.INVALID_DRAW_INDEX);
        if (w.reason() != null) {
          return w;
        }
        long v = (Long) w.value();
        if (v < 0 || v > Integer.MAX_VALUE) {
          return Outcome.reject(
              RejectReason.INVALID_DRAW_INDEX,
              column + " '" + text + "' is not a whole number >= 0");
        }
        return Outcome.ok((int) v);
      }
      case PRICE:
        if (value <= 0) {
          return Outcome.reject(
              RejectReason.NON_POSITIVE_PRICE, column + " '" + text + "' is not above zero");
        }
        return Outcome.ok(value);
      case POSITIVE_NUMBER:
        if (value <= 0) {
          return Outcome.reject(
              RejectReason.NON_POSITIVE_COST_SHIFTER,
              column + " '" + text + "' is not above zero (cost shifters enter in logs)");
        }
        return Outcome.ok(value);
      default:
        return Outcome.ok(value);
    }
  }

  private static Outcome whole(
      Long exact, double value, String text, String column, RejectReason notWhole) {
    if (exact != null) {
      return Outcome.ok(exact);
    }
    if (value != Math.rint(value)) {
      return Outcome.reject(notWhole, column + " '" + text + "' is not a whole number");
    }
    if (Math.abs(value) > MAX_EXACT) {
      return Outcome.reject(
          RejectReason.MALFORMED_NUMBER, column + " '" + text + "' is out of range");
    }
    return Outcome.ok((long) value);
  }

  /** Result of parsing one value: either a value or a reject reason with its message. */
  public record Outcome(Object value, RejectReason reason, String message) {
    static Outcome ok(Object value) {
      return new Outcome(value, null, null);
    }

    static Outcome reject(RejectReason reason, String message) {
      return new Outcome(null, reason, message);
    }
  }
}
