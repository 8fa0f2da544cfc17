package aislecast.jobs.validate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.math.BigDecimal;
import org.junit.jupiter.api.Test;

/** Per-value parsing rules (common practice for CSV numbers; no Spark needed). */
class FieldKindTest {

  private static String reason(FieldKind k, Object raw) {
    FieldKind.Outcome o = k.parse(raw, "c");
    return o.reason() == null ? null : o.reason().code();
  }

  @Test
  void unitsAreWholeNonNegativeNumbers() {
    assertEquals(3L, FieldKind.UNITS.parse("3", "units").value());
    assertEquals(3L, FieldKind.UNITS.parse(" 3.0 ", "units").value(), "a whole decimal is fine");
    assertEquals(0L, FieldKind.UNITS.parse("0", "units").value(), "zero sales are valid");
    assertEquals(7L, FieldKind.UNITS.parse(7, "units").value());
    assertEquals(7L, FieldKind.UNITS.parse(new BigDecimal("7.00"), "units").value());
    assertEquals("non_integer_units", reason(FieldKind.UNITS, "3.5"));
    assertEquals("non_integer_units", reason(FieldKind.UNITS, 2.5d));
    assertEquals("negative_units", reason(FieldKind.UNITS, "-1"));
    assertEquals("malformed_number", reason(FieldKind.UNITS, "abc"));
    assertEquals("malformed_number", reason(FieldKind.UNITS, "1,000"));
    assertEquals("malformed_number", reason(FieldKind.UNITS, "99999999999999999999"));
    assertEquals("non_finite_value", reason(FieldKind.UNITS, "Infinity"));
    assertEquals("non_finite_value", reason(FieldKind.UNITS, Double.NaN));
    assertEquals("missing_value", reason(FieldKind.UNITS, null));
    assertEquals("missing_value", reason(FieldKind.UNITS, "  "));
  }

  @Test
  void pricesArePositiveFiniteNumbers() {
    assertEquals(1.25, FieldKind.PRICE.parse("1.25", "price").value());
    assertEquals(0.5, FieldKind.PRICE.parse(".5", "price").value());
    assertEquals(1e3, FieldKind.PRICE.parse("1e3", "price").value());
    assertEquals("missing_price", reason(FieldKind.PRICE, ""));
    assertEquals("non_positive_price", reason(FieldKind.PRICE, "0"));
    assertEquals("non_positive_price", reason(FieldKind.PRICE, "-2"));
    assertEquals("non_finite_value", reason(FieldKind.PRICE, "nan"));
    assertEquals("non_finite_value", reason(FieldKind.PRICE, "-inf"));
    // Java's own parser would accept these; data files should not.
    assertEquals("malformed_number", reason(FieldKind.PRICE, "1.5d"));
    assertEquals("malformed_number", reason(FieldKind.PRICE, "0x1p3"));
  }

  @Test
  void otherKinds() {
    assertEquals("2024-01-08", FieldKind.WEEK.parse("2024-01-08", "week").value());
    assertEquals("malformed_week", reason(FieldKind.WEEK, "2024-1-8"));
    assertEquals("malformed_week", reason(FieldKind.WEEK, "2023-02-29"));
    assertEquals("S1", FieldKind.KEY.parse(" S1 ", "store_id").value());
    assertEquals("42", FieldKind.KEY.parse(42L, "store_id").value());
    assertEquals(1000L, FieldKind.MARKET_SIZE.parse("1000", "shoppers").value());
    assertEquals("non_positive_market_size", reason(FieldKind.MARKET_SIZE, "0"));
    assertEquals("non_integer_market_size", reason(FieldKind.MARKET_SIZE, "10.5"));
    assertEquals(1.0, FieldKind.NUMBER.parse(true, "on_display").value());
    assertEquals(-3.5, FieldKind.NUMBER.parse("-3.5", "x").value());
    assertEquals("non_positive_cost_shifter", reason(FieldKind.POSITIVE_NUMBER, "0"));
    assertEquals(4, FieldKind.DRAW_INDEX.parse("4", "draw").value());
    assertEquals("invalid_draw_index", reason(FieldKind.DRAW_INDEX, "-1"));
    assertEquals("invalid_draw_index", reason(FieldKind.DRAW_INDEX, "1.5"));
    assertNull(FieldKind.NUMBER.parse("0", "x").reason());
  }

  @Test
  void numericTextRegexAgreesWithTheParser() {
    java.util.regex.Pattern p = java.util.regex.Pattern.compile(FieldKind.NUMERIC_TEXT_REGEX);
    for (String s : new String[] {"1", "-2.5", " 3e4 ", ".5", "NaN", "-Infinity", "inf"}) {
      assertEquals(true, p.matcher(s).find(), s);
      RejectReason r = FieldKind.NUMBER.parse(s, "x").reason();
      assertTrue(r == null || r == RejectReason.NON_FINITE_VALUE, s + " reads as a number");
    }
    for (String s : new String[] {"abc", "Glacier Fizz", "1,5", ""}) {
      assertEquals(false, p.matcher(s).find(), s);
    }
  }
}
