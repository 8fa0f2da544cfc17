package aislecast.core.model;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.TreeSet;

/**
 * Builds a {@link StoreData} from one store's accepted sales rows, in a canonical order (weeks
 * ascending, then catalog product index), so the same rows always give the same arrays however
 * they arrived (file order, Spark partitioning).
 */
public final class StoreAssembler {
  /**
   * One sales row.
   *
   * @param week first day of the week, ISO date (sorts chronologically)
   * @param product catalog index
   * @param z demand shifters (Kz)
   * @param c cost shifters, already transformed (e.g. log unit cost) (Kc)
   */
  public record Row(String week, int product, long units, double price, double[] z, double[] c) {}

  private StoreAssembler() {}

  /**
   * @param demographics (1, demographics) of the store
   * @param nu shopper draws R x (1 + Kx)
   * @param marketSize shoppers per week; every week of the rows must have one
   */
  public static StoreData assemble(String storeId, int storeIndex, double[] demographics,
      double[] nu, int shoppers, List<Row> rows, Map<String, Long> marketSize, int kz, int kc) {
    List<Row> sorted = new ArrayList<>(rows);
    sorted.sort(Comparator.comparing(Row::week).thenComparingInt(Row::product));
    TreeSet<Integer> stocked = new TreeSet<>();
    List<String> weeks = new ArrayList<>();
    List<Integer> starts = new ArrayList<>();
    for (int i = 0; i < sorted.size(); i++) {
      Row r = sorted.get(i);
      stocked.add(r.product());
      if (weeks.isEmpty() || !weeks.get(weeks.size() - 1).equals(r.week())) {
        weeks.add(r.week());
        starts.add(i);
      }
    }
    int n = sorted.size();
    int t = weeks.size();
    int[] rowStart = new int[t + 1];
    long[] size = new long[t];
    for (int w = 0; w < t; w++) {
      rowStart[w] = starts.get(w);
      Long m = marketSize.get(weeks.get(w));
      if (m == null) {
        throw new IllegalArgumentException(
            "store " + storeId + " has no market size for week " + weeks.get(w));
      }
      size[w] = m;
    }
    rowStart[t] = n;
    int[] product = new int[n];
    long[] units = new long[n];
    double[] price = new double[n];
    double[] z = new double[n * kz];
    double[] c = new double[n * kc];
    for (int i = 0; i < n; i++) {
      Row r = sorted.get(i);
      product[i] = r.product();
      units[i] = r.units();
      price[i] = r.price();
      System.arraycopy(r.z(), 0, z, i * kz, kz);
      System.arraycopy(r.c(), 0, c, i * kc, kc);
    }
    return new StoreData(storeId, storeIndex, demographics, nu, shoppers,
        stocked.stream().mapToInt(Integer::intValue).toArray(), weeks.toArray(new String[0]),
        size, rowStart, product, units, price, kz, z, kc, c);
  }
}
