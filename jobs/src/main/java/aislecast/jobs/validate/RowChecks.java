package aislecast.jobs.validate;

import java.io.Serializable;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Key-level checks on parsed rows held as arrays in the layout of
 * {@link TableSpec#parsedSchema()} ({@code _row}, fields, {@code _reason}, {@code _message}, then
 * any extra columns). Used on the driver for the small tables and inside tasks for the large
 * ones, so both apply exactly the same rules. A row keeps the first reason it gets.
 */
final class RowChecks implements Serializable {
  private static final long serialVersionUID = 1L;

  private final Map<String, Integer> index = new HashMap<>();
  private final int reason;
  private final int message;
  private final int width;

  RowChecks(TableSpec spec, int extraColumns) {
    List<TableSpec.Field> fields = spec.fields();
    for (int i = 0; i < fields.size(); i++) {
      index.put(fields.get(i).name(), i + 1);
    }
    reason = fields.size() + 1;
    message = fields.size() + 2;
    width = fields.size() + 3 + extraColumns;
  }

  /** Position of field {@code name} in a row. */
  int at(String name) {
    Integer i = index.get(name);
    if (i == null) {
      throw new IllegalArgumentException("no field " + name);
    }
    return i;
  }

  /** Row length including the extra columns. */
  int width() {
    return width;
  }

  /** A copy of {@code values} widened to {@link #width()} (extra columns null). */
  Object[] widen(Object[] values) {
    return Arrays.copyOf(values, width);
  }

  /** Whether the row has no reject reason yet. */
  boolean open(Object[] row) {
    return row[reason] == null;
  }

  /** Gives an open row its reason and message; a row already rejected keeps its first. */
  void reject(Object[] row, RejectReason why, String text) {
    if (open(row)) {
      row[reason] = why.code();
      row[message] = text;
    }
  }

  /**
   * Rejects every copy of a key held by more than one open row, e.g. "store_id 'S1', week
   * '2024-01-01' appears in 2 rows; every copy is rejected".
   */
  void rejectDuplicates(Iterable<Object[]> rows, String... keys) {
    int[] at = new int[keys.length];
    for (int i = 0; i < keys.length; i++) {
      at[i] = at(keys[i]);
    }
    Map<List<Object>, Integer> copies = new HashMap<>();
    for (Object[] row : rows) {
      if (open(row)) {
        copies.merge(key(row, at), 1, Integer::sum);
      }
    }
    for (Object[] row : rows) {
      if (!open(row)) {
        continue;
      }
      int n = copies.get(key(row, at));
      if (n > 1) {
        StringBuilder sb = new StringBuilder();
        for (int i = 0; i < keys.length; i++) {
          sb.append(i == 0 ? "" : ", ").append(keys[i]).append(" '").append(row[at[i]])
              .append('\'');
        }
        sb.append(" appears in ").append(n).append(" rows; every copy is rejected");
        reject(row, RejectReason.DUPLICATE_KEY, sb.toString());
      }
    }
  }

  private static List<Object> key(Object[] row, int[] at) {
    Object[] k = new Object[at.length];
    for (int i = 0; i < at.length; i++) {
      k[i] = row[at[i]];
    }
    return Arrays.asList(k);
  }
}
