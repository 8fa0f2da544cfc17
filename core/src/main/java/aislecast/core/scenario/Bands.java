package aislecast.core.scenario;

import java.util.Arrays;

/**
 * Summary of a quantity over posterior draws: mean, sd (n - 1), the 5/25/50/75/95% quantiles
 * (linear interpolation between order statistics, Hyndman and Fan 1996 type 7, the R default) and
 * the share of draws above zero ("probability of a gain" when the quantity is a change).
 */
public record Bands(int draws, double mean, double sd, double q05, double q25, double q50,
    double q75, double q95, double probPositive) {

  /** Summary of {@code values[0..n)}; NaN entries are not allowed (callers drop failed draws). */
  public static Bands of(double[] values, int n) {
    if (n < 1) {
      return new Bands(0, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN,
          Double.NaN, Double.NaN);
    }
    double[] v = Arrays.copyOf(values, n);
    double sum = 0;
    int positive = 0;
    for (double x : v) {
      if (Double.isNaN(x)) {
        throw new IllegalArgumentException("NaN among the values to summarise");
      }
      sum += x;
      positive += x > 0 ? 1 : 0;
    }
    double mean = sum / n;
    double ss = 0;
    for (double x : v) {
      ss += (x - mean) * (x - mean);
    }
    Arrays.sort(v);
    return new Bands(n, mean, n > 1 ? Math.sqrt(ss / (n - 1)) : 0.0, quantile(v, 0.05),
        quantile(v, 0.25), quantile(v, 0.5), quantile(v, 0.75), quantile(v, 0.95),
        (double) positive / n);
  }

  /** Type 7 quantile of sorted values. */
  public static double quantile(double[] sorted, double q) {
    int n = sorted.length;
    double h = (n - 1) * q;
    int lo = (int) Math.floor(h);
    int hi = Math.min(lo + 1, n - 1);
    return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
  }
}
