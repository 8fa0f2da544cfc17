package aislecast.core.diag;

import java.util.Arrays;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.stat.ranking.NaNStrategy;
import org.apache.commons.math3.stat.ranking.NaturalRanking;
import org.apache.commons.math3.stat.ranking.TiesStrategy;
import org.apache.commons.math3.transform.DftNormalization;
import org.apache.commons.math3.transform.FastFourierTransformer;
import org.apache.commons.math3.transform.TransformType;

/**
 * Convergence diagnostics and Monte Carlo errors for one scalar parameter sampled by several Markov
 * chains.
 *
 * <p>Every function takes {@code chains[c][t]}: M chains of N draws each (not modified). Methods
 * follow Vehtari, Gelman, Simpson, Carpenter and Buerkner (2021), "Rank-normalization, folding, and
 * localization: an improved R-hat for assessing convergence of MCMC", Bayesian Analysis 16(2),
 * 667-718 (below: "VGSCB"), in the form computed by ArviZ 0.23.4, whose values the tests reproduce
 * to within 1e-13 relative ({@code tools/diag-fixture/make_fixture.py}, {@code
 * DiagnosticsArvizFixtureTest}).
 *
 * <p>Conventions shared by all functions:
 *
 * <ul>
 *   <li><b>Splitting.</b> "Split chains" are the first and the last {@code floor(N/2)} draws of
 *       each chain as 2M chains; for odd N the middle draw is left out (as ArviZ does).
 *   <li><b>Rank normalisation.</b> {@code z = Phi^-1((r - 3/8) / (S + 1/4))}, where r is the rank
 *       of a draw among all S draws pooled over chains, ties (-0.0 and 0.0 included) get their
 *       average rank, and {@code Phi^-1} is commons-math3's normal inverse CDF (VGSCB, rank
 *       normalisation with Blom's offset 3/8).
 *   <li><b>Quantiles</b> of the pooled draws use linear interpolation between order statistics
 *       (Hyndman and Fan 1996, type 7; numpy's and R's default).
 * </ul>
 *
 * <p>Degenerate input never throws; it yields {@code NaN}:
 *
 * <ul>
 *   <li>any NaN or infinite draw: every function returns NaN (no diagnostic of a broken chain is
 *       meaningful, and dropping draws silently would hide it);
 *   <li>all draws identical (zero variance): R-hat, ESS and MCSE are NaN (0/0 in their
 *       definitions). The R package posterior by the paper's authors does the same; ArviZ 0.23.4
 *       returns NaN for R-hat but the draw count M*N for ESS, which would report perfect mixing for
 *       a parameter that never moved;
 *   <li>fewer than {@link #MIN_DRAWS} draws per chain: R-hat, ESS and MCSE are NaN (the split
 *       halves would hold fewer than two draws); R-hat also needs at least {@link #MIN_CHAINS_RHAT}
 *       chains;
 *   <li>each chain constant but chains at different values: R-hat is {@code +Infinity} (no
 *       within-chain variance, positive between-chain variance).
 * </ul>
 *
 * <p>Malformed arrays (null, no chains, a null or empty chain, chains of unequal length) and
 * probabilities outside [0, 1] are caller errors and throw {@link IllegalArgumentException}.
 */
public final class Diagnostics {
  private Diagnostics() {}

  /** Fewest draws per chain for which R-hat, ESS and MCSE are computed. */
  public static final int MIN_DRAWS = 4;

  /** Fewest chains for which R-hat is computed. */
  public static final int MIN_CHAINS_RHAT = 2;

  /** Quantile probabilities whose indicator ESS defines the tail ESS (VGSCB, tail-ESS). */
  public static final double TAIL_LOW = 0.05;

  /** Upper quantile probability of the tail ESS. */
  public static final double TAIL_HIGH = 0.95;

  private static final double BLOM_OFFSET = 3.0 / 8.0;

  /** Transformed draws (z-scores, indicators) spanning less than this count as constant. */
  private static final double CONSTANT_SPAN = 1e-15;

  /** Phi(-1) and Phi(1): the bounds of a +-1 sd interval, as in Stan, posterior and ArviZ. */
  private static final double[] ONE_SD_PROBS = {0.1586553, 0.8413447};

  private static final double BETA_INVERSE_ACCURACY = 1e-12;

  private static final NormalDistribution STD_NORMAL = new NormalDistribution(null, 0.0, 1.0);

  private static final NaturalRanking AVERAGE_RANKS =
      new NaturalRanking(NaNStrategy.FAILED, TiesStrategy.AVERAGE);

  // ---------------------------------------------------------------------------------------------
  // R-hat

  /**
   * Classic split R-hat (Gelman et al., Bayesian Data Analysis 3rd ed., section 11.4; VGSCB's
   * review of split-R-hat) on the 2M split chains of n = floor(N/2) draws:
   *
   * <pre>
   *   W = mean_j s_j^2,   B = n var_j(mean_j),   R-hat = sqrt(((n - 1)/n W + B/n) / W)
   * </pre>
   *
   * where s_j^2 and var use divisor (count - 1). NaN as listed in the class comment.
   */
  public static double splitRhat(double[][] chains) {
    if (!usable(chains, MIN_CHAINS_RHAT)) {
      return Double.NaN;
    }
    return rhatOf(split(chains));
  }

  /**
   * Rank-normalised split R-hat (VGSCB, rank normalisation and folding): the larger of the bulk
   * R-hat (classic R-hat of the rank-normalised split chains) and the tail R-hat (classic R-hat of
   * the rank-normalised folded split chains {@code |x - median(x)|}, the median taken over all
   * split draws, the midpoint of the two middle draws for an even count). If the folded draws are
   * constant (a symmetric two-point posterior) the tail R-hat is undefined and the bulk R-hat is
   * returned, as ArviZ does. NaN as listed in the class comment.
   */
  public static double rankRhat(double[][] chains) {
    if (!usable(chains, MIN_CHAINS_RHAT)) {
      return Double.NaN;
    }
    double[][] split = split(chains);
    double bulk = rhatOf(zScale(split));
    double tail = rhatOf(zScale(fold(split)));
    return tail > bulk ? tail : bulk;
  }

  // ---------------------------------------------------------------------------------------------
  // Effective sample size

  /**
   * Bulk effective sample size (VGSCB, bulk-ESS): the ESS (see {@link #essMean}) of the
   * rank-normalised split chains. Needs one chain or more; NaN as listed in the class comment.
   */
  public static double essBulk(double[][] chains) {
    if (!usable(chains, 1)) {
      return Double.NaN;
    }
    return essOf(zScale(split(chains)));
  }

  /**
   * Tail effective sample size (VGSCB, tail-ESS): {@code min(essQuantile(0.05),
   * essQuantile(0.95))}. NaN as listed in the class comment.
   */
  public static double essTail(double[][] chains) {
    if (!usable(chains, 1)) {
      return Double.NaN;
    }
    double[] sorted = sortedPool(chains);
    return Math.min(
        essIndicator(chains, quantileOfSorted(sorted, TAIL_LOW)),
        essIndicator(chains, quantileOfSorted(sorted, TAIL_HIGH)));
  }

  /**
   * Effective sample size of the indicator {@code I(x <= q_p)}, where q_p is the p-quantile of all
   * draws pooled (VGSCB, ESS for quantiles); computed on the split indicator chains like {@link
   * #essMean}. NaN as listed in the class comment.
   *
   * @throws IllegalArgumentException if {@code prob} is not in [0, 1]
   */
  public static double essQuantile(double[][] chains, double prob) {
    checkProb(prob);
    if (!usable(chains, 1)) {
      return Double.NaN;
    }
    return essIndicator(chains, quantileOfSorted(sortedPool(chains), prob));
  }

  /**
   * Effective sample size of the mean, on the split chains, not rank-normalised (VGSCB's review of
   * ESS; Geyer 1992; Stan's estimator). With m split chains of n draws, per-chain autocovariances
   * {@code c_j(t)} computed by FFT, {@code W = mean_j c_j(0) n/(n-1)} and {@code var+ = (n-1)/n W +
   * var_j(mean_j)}:
   *
   * <pre>
   *   rho(t) = 1 - (W - mean_j c_j(t)) / var+
   *   tau    = -1 + 2 sum_{t=0}^{K} rho(t) + rho(K+1)   (Geyer's initial monotone sequence)
   *   ESS    = m n / max(tau, 1/log10(m n))
   * </pre>
   *
   * Geyer's sequence sums the pairs {@code rho(2k) + rho(2k+1)} while they are positive and lowers
   * each pair to the previous one when it rises; the last even-lag term rho(K+1) is kept when
   * positive, and tau is floored at {@code 1/log10(mn)} so that antithetic chains cannot report an
   * unbounded ESS (both as in Stan and ArviZ). ESS can exceed M*N for antithetic chains. NaN as
   * listed in the class comment.
   */
  public static double essMean(double[][] chains) {
    if (!usable(chains, 1)) {
      return Double.NaN;
    }
    return essOf(split(chains));
  }

  // ---------------------------------------------------------------------------------------------
  // Monte Carlo standard errors

  /**
   * Monte Carlo standard error of the posterior mean: {@code sd / sqrt(essMean)}, sd over all draws
   * pooled with divisor S - 1 (VGSCB, MCSE). NaN as listed in the class comment.
   */
  public static double mcseMean(double[][] chains) {
    if (!usable(chains, 1)) {
      return Double.NaN;
    }
    return sdOf(pool(chains)) / Math.sqrt(essOf(split(chains)));
  }

  /**
   * Monte Carlo standard error of the p-quantile (VGSCB, MCSE for quantiles). With {@code e =
   * essQuantile(p)} and S pooled draws sorted as {@code x_(1) <= ... <= x_(S)}:
   *
   * <pre>
   *   a = Beta^-1(0.1586553; e p + 1, e (1 - p) + 1),   b = Beta^-1(0.8413447; same)
   *   MCSE = (x_(ceil(b S)) - x_(max(floor(a S), 1))) / 2       with ceil(b S) capped at S
   * </pre>
   *
   * i.e. half the width of the draws spanning a +-1 sd interval of the quantile's position. Beta
   * quantiles by commons-math3. NaN as listed in the class comment.
   *
   * @throws IllegalArgumentException if {@code prob} is not in [0, 1]
   */
  public static double mcseQuantile(double[][] chains, double prob) {
    checkProb(prob);
    if (!usable(chains, 1)) {
      return Double.NaN;
    }
    double[] sorted = sortedPool(chains);
    double ess = essIndicator(chains, quantileOfSorted(sorted, prob));
    if (Double.isNaN(ess)) {
      return Double.NaN;
    }
    BetaDistribution beta =
        new BetaDistribution(
            null, ess * prob + 1.0, ess * (1.0 - prob) + 1.0, BETA_INVERSE_ACCURACY);
    int s = sorted.length;
    // 0-based positions; the same order statistics as the 1-based formula above.
    double lower = beta.inverseCumulativeProbability(ONE_SD_PROBS[0]) * s - 1.0;
    double upper = beta.inverseCumulativeProbability(ONE_SD_PROBS[1]) * s - 1.0;
    double th1 = sorted[(int) Math.floor(Math.max(lower, 0.0))];
    double th2 = sorted[(int) Math.ceil(Math.min(upper, s - 1.0))];
    return (th2 - th1) / 2.0;
  }

  // ---------------------------------------------------------------------------------------------
  // Quantiles and summary

  /**
   * The p-quantile of all draws pooled, by linear interpolation (Hyndman-Fan type 7): with {@code h
   * = (S - 1) p}, {@code q = x_(floor h) + (h - floor h)(x_(floor h + 1) - x_(floor h))} on the
   * 0-based sorted draws. Works for any number of draws; NaN if any draw is NaN or infinite.
   *
   * @throws IllegalArgumentException if {@code prob} is not in [0, 1] or the array is malformed
   */
  public static double quantile(double[][] chains, double prob) {
    checkProb(prob);
    checkShape(chains);
    if (!allFinite(chains)) {
      return Double.NaN;
    }
    return quantileOfSorted(sortedPool(chains), prob);
  }

  /**
   * Summary of one parameter: pooled mean, sd (divisor S - 1; NaN for a single draw), 5/50/95%
   * quantiles as {@link #quantile}, {@link #rankRhat}, {@link #essBulk}, {@link #essTail} and
   * {@link #mcseMean}. Each field follows its function's rules for degenerate input; if any draw is
   * NaN or infinite, every field is NaN.
   *
   * @throws IllegalArgumentException if the array is malformed
   */
  public static ParameterSummary summarize(double[][] chains) {
    checkShape(chains);
    if (!allFinite(chains)) {
      double nan = Double.NaN;
      return new ParameterSummary(nan, nan, nan, nan, nan, nan, nan, nan, nan);
    }
    double[] pooled = pool(chains);
    double[] sorted = pooled.clone();
    Arrays.sort(sorted);
    double mean = meanOf(pooled);
    double sd = pooled.length > 1 ? sdOf(pooled) : Double.NaN;
    double q05 = quantileOfSorted(sorted, 0.05);
    double q50 = quantileOfSorted(sorted, 0.5);
    double q95 = quantileOfSorted(sorted, 0.95);

    double rhat = Double.NaN;
    double essBulk = Double.NaN;
    double essTail = Double.NaN;
    double mcseMean = Double.NaN;
    boolean enoughDraws = chains[0].length >= MIN_DRAWS;
    if (enoughDraws && sorted[0] != sorted[sorted.length - 1]) {
      double[][] split = split(chains);
      double[][] zSplit = zScale(split);
      if (chains.length >= MIN_CHAINS_RHAT) {
        double bulk = rhatOf(zSplit);
        double tail = rhatOf(zScale(fold(split)));
        rhat = tail > bulk ? tail : bulk;
      }
      essBulk = essOf(zSplit);
      essTail =
          Math.min(
              essIndicator(chains, quantileOfSorted(sorted, TAIL_LOW)),
              essIndicator(chains, quantileOfSorted(sorted, TAIL_HIGH)));
      mcseMean = sd / Math.sqrt(essOf(split));
    }
    return new ParameterSummary(mean, sd, q05, q50, q95, rhat, essBulk, essTail, mcseMean);
  }

  // ---------------------------------------------------------------------------------------------
  // Building blocks (package-private for tests)

  /**
   * Autocovariance of one chain at lags 0..n-1 with divisor n, {@code c(t) = (1/n) sum_{i<n-t} (x_i
   * - xbar)(x_{i+t} - xbar)}, by the Wiener-Khinchin theorem: zero-pad to a power of two {@code >=
   * 2n} (so the circular correlation equals the linear one), take |FFT|^2, invert.
   *
   * @param chain not modified
   * @param out modified: c(0..n-1), length >= n
   */
  static void autocovariance(double[] chain, double[] out) {
    int n = chain.length;
    int m = Integer.highestOneBit(Math.max(1, 2 * n - 1)) << 1;
    double[][] ri = new double[2][m];
    double mean = meanOf(chain);
    for (int i = 0; i < n; i++) {
      ri[0][i] = chain[i] - mean;
    }
    FastFourierTransformer.transformInPlace(ri, DftNormalization.STANDARD, TransformType.FORWARD);
    for (int k = 0; k < m; k++) {
      ri[0][k] = ri[0][k] * ri[0][k] + ri[1][k] * ri[1][k];
      ri[1][k] = 0.0;
    }
    // STANDARD inverse divides by m.
    FastFourierTransformer.transformInPlace(ri, DftNormalization.STANDARD, TransformType.INVERSE);
    for (int t = 0; t < n; t++) {
      out[t] = ri[0][t] / n;
    }
  }

  /** Classic R-hat of the given (already split) chains; formula in {@link #splitRhat}. */
  static double rhatOf(double[][] x) {
    int m = x.length;
    int n = x[0].length;
    double[] means = new double[m];
    double within = 0.0;
    for (int j = 0; j < m; j++) {
      means[j] = meanOf(x[j]);
      within += varianceOf(x[j], means[j]);
    }
    within /= m;
    double between = n * varianceOf(means, meanOf(means));
    return Math.sqrt((between / within + n - 1.0) / n);
  }

  /** ESS of the given (already split or transformed) chains; formula in {@link #essMean}. */
  static double essOf(double[][] x) {
    int m = x.length;
    int n = x[0].length;
    double min = Double.POSITIVE_INFINITY;
    double max = Double.NEGATIVE_INFINITY;
    for (double[] chain : x) {
      for (double v : chain) {
        min = Math.min(min, v);
        max = Math.max(max, v);
      }
    }
    if (max - min < CONSTANT_SPAN) {
      // A constant indicator (the quantile is pinned: every draw says the same): ArviZ reports
      // the draw count, and so do we. Constant raw draws never get here: callers return NaN.
      return (double) m * n;
    }

    double[] meanAcov = new double[n];
    double[] acov = new double[n];
    double[] chainMeans = new double[m];
    for (int j = 0; j < m; j++) {
      autocovariance(x[j], acov);
      for (int t = 0; t < n; t++) {
        meanAcov[t] += acov[t];
      }
      chainMeans[j] = meanOf(x[j]);
    }
    for (int t = 0; t < n; t++) {
      meanAcov[t] /= m;
    }
    double meanVar = meanAcov[0] * n / (n - 1.0);
    double varPlus = meanVar * (n - 1.0) / n;
    if (m > 1) {
      varPlus += varianceOf(chainMeans, meanOf(chainMeans));
    }

    double[] rho = new double[n];
    double rhoEven = 1.0;
    rho[0] = rhoEven;
    double rhoOdd = 1.0 - (meanVar - meanAcov[1]) / varPlus;
    rho[1] = rhoOdd;

    // Geyer's initial positive sequence: keep pairs while their sum is positive.
    int t = 1;
    while (t < n - 3 && rhoEven + rhoOdd > 0.0) {
      rhoEven = 1.0 - (meanVar - meanAcov[t + 1]) / varPlus;
      rhoOdd = 1.0 - (meanVar - meanAcov[t + 2]) / varPlus;
      if (rhoEven + rhoOdd >= 0.0) {
        rho[t + 1] = rhoEven;
        rho[t + 2] = rhoOdd;
      }
      t += 2;
    }
    int maxT = t - 2;
    if (rhoEven > 0.0) {
      rho[maxT + 1] = rhoEven;
    }
    // Geyer's initial monotone sequence: pair sums may not increase.
    t = 1;
    while (t <= maxT - 2) {
      if (rho[t + 1] + rho[t + 2] > rho[t - 1] + rho[t]) {
        rho[t + 1] = (rho[t - 1] + rho[t]) / 2.0;
        rho[t + 2] = rho[t + 1];
      }
      t += 2;
    }

    double draws = (double) m * n;
    double sum = 0.0;
    for (int k = 0; k <= maxT; k++) {
      sum += rho[k];
    }
    double tau = -1.0 + 2.0 * sum + rho[maxT + 1];
    tau = Math.max(tau, 1.0 / Math.log10(draws));
    for (double r : rho) {
      if (Double.isNaN(r)) {
        return Double.NaN;
      }
    }
    return draws / tau;
  }

  /** First and last floor(N/2) draws of every chain as 2M chains (middle draw dropped if odd). */
  static double[][] split(double[][] chains) {
    int m = chains.length;
    int n = chains[0].length;
    int half = n / 2;
    double[][] out = new double[2 * m][];
    for (int j = 0; j < m; j++) {
      out[j] = Arrays.copyOfRange(chains[j], 0, half);
      out[m + j] = Arrays.copyOfRange(chains[j], n - half, n);
    }
    return out;
  }

  /** Rank-normalised copy: ranks over all draws pooled, average ranks for ties. */
  static double[][] zScale(double[][] x) {
    double[] pooled = pool(x);
    for (int i = 0; i < pooled.length; i++) {
      // -0.0 + 0.0 is 0.0: the ranking orders by Double.compare, which would not tie -0.0 and 0.0.
      pooled[i] += 0.0;
    }
    double[] ranks = AVERAGE_RANKS.rank(pooled);
    double denominator = ranks.length - 2.0 * BLOM_OFFSET + 1.0;
    double[][] z = new double[x.length][x[0].length];
    int i = 0;
    for (double[] row : z) {
      for (int t = 0; t < row.length; t++) {
        row[t] = STD_NORMAL.inverseCumulativeProbability((ranks[i++] - BLOM_OFFSET) / denominator);
      }
    }
    return z;
  }

  /** Folded copy {@code |x - median|}, median over all draws pooled. */
  static double[][] fold(double[][] x) {
    double[] sorted = pool(x);
    Arrays.sort(sorted);
    double median = medianOfSorted(sorted);
    double[][] out = new double[x.length][x[0].length];
    for (int j = 0; j < x.length; j++) {
      for (int t = 0; t < x[j].length; t++) {
        out[j][t] = Math.abs(x[j][t] - median);
      }
    }
    return out;
  }

  /**
   * Median of ascending {@code sorted}; for an even count the midpoint {@code (a + b) / 2} of the
   * two middle draws. Not the type-7 formula {@code a + (b - a) / 2}: that can differ in the last
   * bit, which breaks exact ties in the folded draws {@code |x - median|} and so their ranks.
   */
  static double medianOfSorted(double[] sorted) {
    int n = sorted.length;
    if (n % 2 == 1) {
      return sorted[n / 2];
    }
    double a = sorted[n / 2 - 1];
    double b = sorted[n / 2];
    double mid = (a + b) / 2.0;
    return Double.isInfinite(mid) ? a / 2.0 + b / 2.0 : mid;
  }

  /** Type-7 quantile of ascending {@code sorted}. */
  static double quantileOfSorted(double[] sorted, double prob) {
    double h = (sorted.length - 1) * prob;
    int lo = (int) Math.floor(h);
    if (lo >= sorted.length - 1) {
      return sorted[sorted.length - 1];
    }
    return sorted[lo] + (h - lo) * (sorted[lo + 1] - sorted[lo]);
  }

  // ---------------------------------------------------------------------------------------------
  // Helpers

  /** ESS of the split indicator chains {@code I(x <= threshold)}. */
  private static double essIndicator(double[][] chains, double threshold) {
    double[][] indicator = new double[chains.length][chains[0].length];
    for (int j = 0; j < chains.length; j++) {
      for (int t = 0; t < chains[j].length; t++) {
        indicator[j][t] = chains[j][t] <= threshold ? 1.0 : 0.0;
      }
    }
    return essOf(split(indicator));
  }

  /** Validates the shape; true if the draws admit R-hat/ESS/MCSE (finite, enough, not constant). */
  private static boolean usable(double[][] chains, int minChains) {
    checkShape(chains);
    if (chains.length < minChains || chains[0].length < MIN_DRAWS || !allFinite(chains)) {
      return false;
    }
    double first = chains[0][0];
    for (double[] chain : chains) {
      for (double v : chain) {
        if (v != first) {
          return true;
        }
      }
    }
    return false;
  }

  private static void checkShape(double[][] chains) {
    if (chains == null || chains.length == 0) {
      throw new IllegalArgumentException("need at least one chain of draws, got none");
    }
    for (int j = 0; j < chains.length; j++) {
      if (chains[j] == null || chains[j].length == 0) {
        throw new IllegalArgumentException("chain " + j + " has no draws");
      }
      if (chains[j].length != chains[0].length) {
        throw new IllegalArgumentException(
            "chains must have equal length: chain 0 has "
                + chains[0].length
                + " draws, chain "
                + j
                + " has "
                + chains[j].length);
      }
    }
  }

  private static void checkProb(double prob) {
    if (!(prob >= 0.0 && prob <= 1.0)) {
      throw new IllegalArgumentException("probability must be in [0, 1], got " + prob);
    }
  }

  private static boolean allFinite(double[][] chains) {
    for (double[] chain : chains) {
      for (double v : chain) {
        if (!Double.isFinite(v)) {
          return false;
        }
      }
    }
    return true;
  }

  private static double[] pool(double[][] x) {
    double[] out = new double[x.length * x[0].length];
    int i = 0;
    for (double[] row : x) {
      System.arraycopy(row, 0, out, i, row.length);
      i += row.length;
    }
    return out;
  }

  private static double[] sortedPool(double[][] x) {
    double[] sorted = pool(x);
    Arrays.sort(sorted);
    return sorted;
  }

  private static double meanOf(double[] v) {
    double sum = 0.0;
    for (double d : v) {
      sum += d;
    }
    return sum / v.length;
  }

  /** Sample variance, divisor (count - 1), two-pass around the given mean. */
  private static double varianceOf(double[] v, double mean) {
    double ss = 0.0;
    for (double d : v) {
      double e = d - mean;
      ss += e * e;
    }
    return ss / (v.length - 1.0);
  }

  private static double sdOf(double[] v) {
    return Math.sqrt(varianceOf(v, meanOf(v)));
  }
}
