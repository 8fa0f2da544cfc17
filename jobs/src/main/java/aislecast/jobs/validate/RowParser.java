package aislecast.jobs.validate;

import java.io.Serializable;
import org.apache.spark.sql.Row;

/**
 * Parses one raw row (the spec's source columns, in field order) into the values of a row of
 * {@link TableSpec#parsedSchema()}. The first failing field gives the row's reject reason; key
 * and week fields keep their raw text even then, so a rejected row can still be identified.
 */
final class RowParser implements Serializable {
  private static final long serialVersionUID = 1L;

  private final String[] sources;
  private final FieldKind[] kinds;

  RowParser(TableSpec spec) {
    int n = spec.fields().size();
    sources = new String[n];
    kinds = new FieldKind[n];
    for (int i = 0; i < n; i++) {
      sources[i] = spec.fields().get(i).source();
      kinds[i] = spec.fields().get(i).kind();
    }
  }

  /**
   * @param raw source values in field order; not modified
   * @param index 0-based position of the row in the table
   * @return the row's values in the order of {@link TableSpec#parsedSchema()}
   */
  Object[] values(Row raw, long index) {
    int n = kinds.length;
    Object[] out = new Object[n + 3];
    out[0] = index + 1;
    String reason = null;
    String message = null;
    for (int i = 0; i < n; i++) {
      Object value = raw.get(i);
      FieldKind.Outcome o = kinds[i].parse(value, sources[i]);
      if (o.reason() == null) {
        out[i + 1] = o.value();
      } else {
        if (reason == null) {
          reason = o.reason().code();
          message = o.message();
        }
        if ((kinds[i] == FieldKind.KEY || kinds[i] == FieldKind.WEEK) && value != null) {
          String text = value.toString().trim();
          out[i + 1] = text.isEmpty() ? null : text;
        }
      }
    }
    out[n + 1] = reason;
    out[n + 2] = message;
    return out;
  }
}
