package aislecast.core.sim;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;
import org.apache.commons.math3.distribution.BinomialDistribution;
import org.apache.commons.math3.stat.inference.ChiSquareTest;
import org.junit.jupiter.api.Test;

class MultinomialTest {

  private static final double[] P = {0.1, 0.25, 0.05, 0.3}; // outside option: 0.3

  /**
   * Each margin of Multinomial(n, p) is Binomial(n, p_k) (common practice, any probability
   * text); compared by a chi-square goodness-of-fit test against commons-math3's binomial pmf.
   */
  @Test
  void marginsAreBinomial() {
    int n = 20;
    int reps = 20_000;
    long[][] freq = new long[P.length + 1][n + 1];
    SplitMix64 rng = Streams.stream(11L, 1);
    long[] q = new long[P.length];
    for (int i = 0; i < reps; i++) {
      long rest = Multinomial.sample(rng, n, P, P.length, q);
      long sum = rest;
      for (int k = 0; k < P.length; k++) {
        freq[k][(int) q[k]]++;
        sum += q[k];
      }
      assertEquals(n, sum);
      freq[P.length][(int) rest]++;
    }
    ChiSquareTest chi = new ChiSquareTest();
    for (int k = 0; k <= P.length; k++) {
      double p = k < P.length ? P[k] : 0.3;
      BinomialDistribution law = new BinomialDistribution(null, n, p);
      // pool cells with expected count < 5 into their neighbours at the tails
      java.util.List<double[]> cells = new java.util.ArrayList<>();
      double e = 0;
      long o = 0;
      for (int x = 0; x <= n; x++) {
        e += reps * law.probability(x);
        o += freq[k][x];
        if (e >= 5 && reps * law.cumulativeProbability(x, n) >= 5) {
          cells.add(new double[] {e, o});
          e = 0;
          o = 0;
        }
      }
      cells.get(cells.size() - 1)[0] += e;
      cells.get(cells.size() - 1)[1] += o;
      double[] expected = cells.stream().mapToDouble(c -> c[0]).toArray();
      long[] observed = cells.stream().mapToLong(c -> (long) c[1]).toArray();
      double pValue = chi.chiSquareTest(expected, observed);
      assertTrue(pValue > 1e-4, "category " + k + ": chi-square p-value " + pValue);
    }
  }

  /** Cov(q_i, q_j) = -n p_i p_j for i != j (common practice). */
  @Test
  void countsAreNegativelyCorrelatedAsTheLawSays() {
    int n = 50;
    int reps = 40_000;
    SplitMix64 rng = Streams.stream(12L, 1);
    long[] q = new long[P.length];
    double s0 = 0;
    double s1 = 0;
    double s01 = 0;
    for (int i = 0; i < reps; i++) {
      Multinomial.sample(rng, n, P, P.length, q);
      s0 += q[0];
      s1 += q[1];
      s01 += (double) q[0] * q[1];
    }
    double cov = s01 / reps - (s0 / reps) * (s1 / reps);
    double expected = -n * P[0] * P[1];
    // sd of the sample covariance is about sqrt(Var(q0) Var(q1) / reps) ~ 0.03 here
    assertEquals(expected, cov, 0.15);
  }

  @Test
  void edgeCasesAndBadInput() {
    SplitMix64 rng = Streams.stream(13L, 1);
    long[] q = new long[2];
    assertEquals(0, Multinomial.sample(rng, 7, new double[] {0.4, 0.6}, 2, q));
    assertEquals(7, q[0] + q[1]);
    assertEquals(5, Multinomial.sample(rng, 5, new double[] {0.0, 0.0}, 2, q));
    assertEquals(0, Multinomial.sample(rng, 0, new double[] {0.5, 0.2}, 2, q));
    assertThrows(IllegalArgumentException.class,
        () -> Multinomial.sample(rng, 5, new double[] {0.7, 0.6}, 2, q));
    assertThrows(IllegalArgumentException.class,
        () -> Multinomial.sample(rng, 5, new double[] {-0.1, 0.6}, 2, q));
    assertThrows(IllegalArgumentException.class,
        () -> Multinomial.sample(rng, -1, new double[] {0.1, 0.6}, 2, q));
  }
}
