package aislecast.jobs.validate;

import java.util.Collections;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;

/**
 * Row counts of one validation: per table, input, accepted and rejected rows by reason. For every
 * table {@code acceptedRows + rejectedRows == inputRows}; {@link InputValidator} checks this
 * before returning.
 */
public record ValidationSummary(List<TableCounts> tables) {

  public ValidationSummary {
    tables = List.copyOf(tables);
  }

  /** Counts for one table; {@code rejectsByReason} maps reason code to rows. */
  public record TableCounts(
      String table, long inputRows, long acceptedRows, Map<String, Long> rejectsByReason) {
    public TableCounts {
      rejectsByReason = Collections.unmodifiableMap(new TreeMap<>(rejectsByReason));
    }

    public long rejectedRows() {
      return rejectsByReason.values().stream().mapToLong(Long::longValue).sum();
    }
  }

  public TableCounts table(String name) {
    return tables.stream()
        .filter(t -> t.table().equals(name))
        .findFirst()
        .orElseThrow(() -> new IllegalArgumentException("no table " + name));
  }

  public long inputRows() {
    return tables.stream().mapToLong(TableCounts::inputRows).sum();
  }

  public long rejectedRows() {
    return tables.stream().mapToLong(TableCounts::rejectedRows).sum();
  }

  /** Rejected rows over input rows, all tables together (0 when there is no input). */
  public double rejectShare() {
    long in = inputRows();
    return in == 0 ? 0.0 : (double) rejectedRows() / in;
  }

  /** Plain-text table for the console and {@code validation/summary.txt}. */
  public String format(double maxRejectShare) {
    StringBuilder sb = new StringBuilder();
    sb.append(String.format(Locale.ROOT, "  %-14s %12s %12s %12s%n",
        "table", "input", "accepted", "rejected"));
    for (TableCounts t : tables) {
      sb.append(String.format(Locale.ROOT, "  %-14s %12d %12d %12d%n",
          t.table(), t.inputRows(), t.acceptedRows(), t.rejectedRows()));
    }
    boolean any = false;
    for (TableCounts t : tables) {
      for (Map.Entry<String, Long> e : t.rejectsByReason().entrySet()) {
        if (!any) {
          sb.append(String.format(Locale.ROOT, "  rejects by reason:%n"));
          any = true;
        }
        sb.append(String.format(Locale.ROOT, "    %-14s %-26s %10d%n",
            t.table(), e.getKey(), e.getValue()));
      }
    }
    sb.append(String.format(Locale.ROOT,
        "  rejected %d of %d rows (%.2f%%); limit validation.max_reject_share = %.2f%%%n",
        rejectedRows(), inputRows(), 100 * rejectShare(), 100 * maxRejectShare));
    return sb.toString();
  }
}
