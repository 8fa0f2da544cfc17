package aislecast.jobs.validate;

import java.util.List;
import java.util.Locale;
import java.util.Optional;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;

/**
 * The accepted rows of every input table, with canonical column names and parsed types, plus the
 * validation counts. Datasets are persisted; {@link #close()} releases them.
 *
 * <p>Schemas: sales {@code store_id string, week date, product_id string, units long, price
 * double, <demand shifters> double, <cost shifters> double, market_size long} (market_size is the
 * traffic table's shoppers for that store-week if given, else the store's shoppers); products
 * {@code product_id, owner, <attributes> double}; stores {@code store_id, region, shoppers long,
 * <demographics> double}; traffic {@code store_id, week date, shoppers long}; shopper_draws
 * {@code store_id, draw int, <draw columns> double}.
 */
public final class ValidatedInput implements AutoCloseable {
  private final Dataset<Row> sales;
  private final Dataset<Row> products;
  private final Dataset<Row> stores;
  private final Dataset<Row> traffic;
  private final Dataset<Row> shopperDraws;
  private final Columns columns;
  private final ValidationSummary summary;
  private final List<String> notes;
  private final List<Dataset<Row>> persisted;

  /** Column roles resolved against the data (explicit configuration or defaults). */
  public record Columns(
      List<String> demandShifters,
      List<String> costShifters,
      List<String> attributes,
      List<String> demographics,
      List<String> drawColumns) {
    public Columns {
      demandShifters = List.copyOf(demandShifters);
      costShifters = List.copyOf(costShifters);
      attributes = List.copyOf(attributes);
      demographics = List.copyOf(demographics);
      drawColumns = List.copyOf(drawColumns);
    }
  }

  ValidatedInput(
      Dataset<Row> sales,
      Dataset<Row> products,
      Dataset<Row> stores,
      Dataset<Row> traffic,
      Dataset<Row> shopperDraws,
      Columns columns,
      ValidationSummary summary,
      List<String> notes,
      List<Dataset<Row>> persisted) {
    this.sales = sales;
    this.products = products;
    this.stores = stores;
    this.traffic = traffic;
    this.shopperDraws = shopperDraws;
    this.columns = columns;
    this.summary = summary;
    this.notes = List.copyOf(notes);
    this.persisted = List.copyOf(persisted);
  }

  public Dataset<Row> sales() {
    return sales;
  }

  public Dataset<Row> products() {
    return products;
  }

  public Dataset<Row> stores() {
    return stores;
  }

  /** Accepted traffic rows; empty when the input has no traffic table. */
  public Optional<Dataset<Row>> traffic() {
    return Optional.ofNullable(traffic);
  }

  /** Accepted shopper draws; empty when the input has no shopper_draws table. */
  public Optional<Dataset<Row>> shopperDraws() {
    return Optional.ofNullable(shopperDraws);
  }

  public Columns columns() {
    return columns;
  }

  public ValidationSummary summary() {
    return summary;
  }

  /** Things the user should know that are not errors (ignored columns, defaults applied). */
  public List<String> notes() {
    return notes;
  }

  /**
   * Fails when more than {@code maxRejectShare} of all input rows were rejected. Call it after
   * the rejects are safely published, so the user can see them.
   *
   * @param rejectsLocation where the rejects table is, for the message
   * @throws RejectShareExceededException exit code 2
   */
  public void requireRejectShareAtMost(double maxRejectShare, String rejectsLocation) {
    if (summary.rejectShare() > maxRejectShare) {
      throw new RejectShareExceededException(String.format(Locale.ROOT,
          "%d of %d input rows (%.2f%%) were rejected, more than validation.max_reject_share"
              + " = %.2f%%; see the rejects in %s",
          summary.rejectedRows(), summary.inputRows(), 100 * summary.rejectShare(),
          100 * maxRejectShare, rejectsLocation));
    }
  }

  @Override
  public void close() {
    for (Dataset<Row> d : persisted) {
      d.unpersist(false);
    }
  }
}
