package aislecast.core.diag;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.random.Well19937c;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.junit.jupiter.api.Test;

/**
 * Known answers, closed forms and behaviour on degenerate input. Library agreement is in {@link
 * DiagnosticsArvizFixtureTest}. Statistical bands are about 5 standard deviations of the estimator,
 * measured over 100-200 seeds of the same design with ArviZ 0.23.4 (not tuned to the seed used
 * here), so they fail only if the method is wrong.
 */
class DiagnosticsTest {

  // --- building blocks ---------------------------------------------------------------------------

  @Test
  void fftAutocovarianceEqualsTheDirectSum() {
    // Definition c(t) = (1/n) sum_{i<n-t} (x_i - xbar)(x_{i+t} - xbar) (Box and Jenkins,
    // Time Series Analysis, ch. 2; from memory), evaluated directly in O(n^2).
    RandomGenerator rng = new Well19937c(11);
    for (int n : new int[] {2, 3, 5, 16, 17, 100, 1000}) {
      double[] x = new double[n];
      for (int i = 0; i < n; i++) {
        x[i] = 3.0 + rng.nextGaussian() + (i > 0 ? 0.7 * x[i - 1] : 0.0);
      }
      double mean = 0.0;
      for (double v : x) {
        mean += v / n;
      }
      double[] fft = new double[n];
      Diagnostics.autocovariance(x, fft);
      for (int t = 0; t < n; t++) {
        double direct = 0.0;
        for (int i = 0; i + t < n; i++) {
          direct += (x[i] - mean) * (x[i + t] - mean);
        }
        direct /= n;
        assertEquals(direct, fft[t], 1e-10 * (1.0 + Math.abs(fft[0])), "n=" + n + " lag " + t);
      }
    }
  }

  @Test
  void quantileMatchesCommonsMathR7() {
    // commons-math3 Percentile with EstimationType.R_7 is Hyndman-Fan type 7.
    RandomGenerator rng = new Well19937c(5);
    double[][] x = normals(rng, 3, 37);
    double[] pooled = new double[3 * 37];
    for (int j = 0; j < 3; j++) {
      System.arraycopy(x[j], 0, pooled, 37 * j, 37);
    }
    Percentile r7 = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
    for (double p : new double[] {0.01, 0.05, 0.25, 0.5, 0.9, 0.95, 1.0}) {
      assertEquals(r7.evaluate(pooled, 100.0 * p), Diagnostics.quantile(x, p), 1e-14, "p=" + p);
    }
  }

  @Test
  void splitRhatKnownAnswer() {
    // By hand from the split-R-hat formulas of BDA3 section 11.4: split halves
    // {1,2},{3,4},{2,3},{4,5}; n = 2,
    // chain means 1.5, 3.5, 2.5, 4.5; W = 0.5; B = 2 * var(means) = 2 * 5/3;
    // R-hat = sqrt((B/W + n - 1)/n) = sqrt((20/3 + 1)/2) = sqrt(23/6).
    double[][] x = {{1, 2, 3, 4}, {2, 3, 4, 5}};
    assertEquals(Math.sqrt(23.0 / 6.0), Diagnostics.splitRhat(x), 1e-14);
  }

  @Test
  void zScaleUsesBlomOffsetAndAverageRanksForTies() {
    // VGSCB rank normalisation: z = Phi^-1((r - 3/8)/(S + 1/4)); tied draws share the average rank.
    double[][] z = Diagnostics.zScale(new double[][] {{5.0, 1.0}, {5.0, 2.0}});
    NormalDistribution phi = new NormalDistribution();
    double s = 4.0;
    assertEquals(phi.inverseCumulativeProbability((1 - 0.375) / (s + 0.25)), z[0][1], 1e-12);
    assertEquals(phi.inverseCumulativeProbability((2 - 0.375) / (s + 0.25)), z[1][1], 1e-12);
    assertEquals(phi.inverseCumulativeProbability((3.5 - 0.375) / (s + 0.25)), z[0][0], 1e-12);
    assertEquals(z[0][0], z[1][0], 0.0);
  }

  // --- behaviour on well-mixed and badly mixed chains --------------------------------------------

  @Test
  void independentNormalDrawsGiveRhatNearOneAndEssNearN() {
    double[][] x = normals(new Well19937c(2024), 4, 1000);
    int n = 4000;
    // VGSCB recommend trusting chains only when R-hat < 1.01; iid draws must pass.
    assertEquals(1.0, Diagnostics.rankRhat(x), 0.01);
    assertEquals(1.0, Diagnostics.splitRhat(x), 0.01);
    // ESS of iid draws is N; the estimator's relative sd is about 0.05 here.
    assertEquals(1.0, Diagnostics.essBulk(x) / n, 0.25);
    assertEquals(1.0, Diagnostics.essTail(x) / n, 0.25);
    assertEquals(1.0, Diagnostics.essMean(x) / n, 0.25);
    // MCSE of the mean of N iid N(0,1) draws: 1/sqrt(N).
    assertEquals(1.0, Diagnostics.mcseMean(x) * Math.sqrt(n), 0.15);
  }

  @Test
  void ar1EssMatchesItsIntegratedAutocorrelationTime() {
    // AR(1) with coefficient rho: rho(t) = rho^t, tau = (1 + rho)/(1 - rho), so ESS of the mean
    // is N (1 - rho)/(1 + rho) (Geyer 1992, Statistical Science 7, "Practical Markov chain Monte
    // Carlo"; common practice). Relative sd of the estimate here is about 0.04.
    double rho = 0.9;
    double[][] x = ar1(new Well19937c(77), 4, 25_000, rho);
    double n = 100_000;
    double expected = n * (1 - rho) / (1 + rho);
    assertEquals(1.0, Diagnostics.essMean(x) / expected, 0.2);
    assertEquals(1.0, Diagnostics.essBulk(x) / expected, 0.2);
    // Unit marginal variance: MCSE of the mean = sqrt(tau / N).
    assertEquals(1.0, Diagnostics.mcseMean(x) / Math.sqrt((1 + rho) / (1 - rho) / n), 0.15);
    assertTrue(Diagnostics.rankRhat(x) < 1.01);
  }

  @Test
  void mcseOfQuantileMatchesAsymptoticVarianceForIidDraws() {
    // Sample p-quantile of N iid draws: sd = sqrt(p(1-p)/N) / f(q_p) (van der Vaart, Asymptotic
    // Statistics, ch. 21; from memory). The order-statistic estimator's relative sd is about 0.09
    // here.
    double[][] x = normals(new Well19937c(31), 4, 25_000);
    NormalDistribution phi = new NormalDistribution();
    for (double p : new double[] {0.05, 0.5, 0.95}) {
      double asymptotic =
          Math.sqrt(p * (1 - p) / 100_000) / phi.density(phi.inverseCumulativeProbability(p));
      assertEquals(1.0, Diagnostics.mcseQuantile(x, p) / asymptotic, 0.4, "p=" + p);
    }
  }

  @Test
  void shiftedChainGivesRhatAboveOnePointOne() {
    double[][] x = normals(new Well19937c(9), 4, 1000);
    for (int t = 0; t < 1000; t++) {
      x[3][t] += 2.0;
    }
    assertTrue(Diagnostics.rankRhat(x) > 1.1, "rank R-hat " + Diagnostics.rankRhat(x));
    assertTrue(Diagnostics.splitRhat(x) > 1.1, "split R-hat " + Diagnostics.splitRhat(x));
    assertTrue(Diagnostics.summarize(x).rhat() > 1.1);
  }

  @Test
  void chainWithLargerScaleIsCaughtOnlyByTheFoldedRhat() {
    // VGSCB's motivating example: chains with equal means but different variances fool classic
    // R-hat; the folded (tail) R-hat inside rank R-hat detects them. Over 5 seeds ArviZ gave
    // rank R-hat 1.135-1.148 and split R-hat 0.999-1.000 for this design.
    double[][] x = normals(new Well19937c(13), 4, 1000);
    for (int t = 0; t < 1000; t++) {
      x[3][t] *= 3.0;
    }
    assertTrue(Diagnostics.splitRhat(x) < 1.01, "split R-hat " + Diagnostics.splitRhat(x));
    assertTrue(Diagnostics.rankRhat(x) > 1.05, "rank R-hat " + Diagnostics.rankRhat(x));
  }

  // --- degenerate input --------------------------------------------------------------------------

  @Test
  void constantDrawsGiveNanDiagnosticsWithoutThrowing() {
    double[][] x = new double[4][100];
    for (double[] chain : x) {
      java.util.Arrays.fill(chain, 3.25);
    }
    assertTrue(Double.isNaN(Diagnostics.rankRhat(x)));
    assertTrue(Double.isNaN(Diagnostics.splitRhat(x)));
    assertTrue(Double.isNaN(Diagnostics.essBulk(x)));
    assertTrue(Double.isNaN(Diagnostics.essTail(x)));
    assertTrue(Double.isNaN(Diagnostics.essMean(x)));
    assertTrue(Double.isNaN(Diagnostics.essQuantile(x, 0.3)));
    assertTrue(Double.isNaN(Diagnostics.mcseMean(x)));
    assertTrue(Double.isNaN(Diagnostics.mcseQuantile(x, 0.05)));
    ParameterSummary s = Diagnostics.summarize(x);
    assertEquals(3.25, s.mean(), 0.0);
    assertEquals(0.0, s.sd(), 0.0);
    assertEquals(3.25, s.q05(), 0.0);
    assertEquals(3.25, s.q95(), 0.0);
    assertTrue(Double.isNaN(s.rhat()) && Double.isNaN(s.essBulk()) && Double.isNaN(s.essTail()));
    assertTrue(Double.isNaN(s.mcseMean()));
  }

  @Test
  void chainsStuckAtDifferentValuesGiveInfiniteRhat() {
    double[][] x = {{1, 1, 1, 1, 1, 1}, {2, 2, 2, 2, 2, 2}};
    assertEquals(Double.POSITIVE_INFINITY, Diagnostics.splitRhat(x));
    assertEquals(Double.POSITIVE_INFINITY, Diagnostics.rankRhat(x));
  }

  @Test
  void anyNanOrInfiniteDrawGivesNanEverywhere() {
    for (double bad : new double[] {Double.NaN, Double.POSITIVE_INFINITY}) {
      double[][] x = normals(new Well19937c(3), 4, 200);
      x[2][117] = bad;
      assertTrue(Double.isNaN(Diagnostics.rankRhat(x)));
      assertTrue(Double.isNaN(Diagnostics.splitRhat(x)));
      assertTrue(Double.isNaN(Diagnostics.essBulk(x)));
      assertTrue(Double.isNaN(Diagnostics.essTail(x)));
      assertTrue(Double.isNaN(Diagnostics.essMean(x)));
      assertTrue(Double.isNaN(Diagnostics.mcseMean(x)));
      assertTrue(Double.isNaN(Diagnostics.mcseQuantile(x, 0.95)));
      assertTrue(Double.isNaN(Diagnostics.quantile(x, 0.5)));
      ParameterSummary s = Diagnostics.summarize(x);
      for (double v :
          new double[] {
            s.mean(),
            s.sd(),
            s.q05(),
            s.q50(),
            s.q95(),
            s.rhat(),
            s.essBulk(),
            s.essTail(),
            s.mcseMean()
          }) {
        assertTrue(Double.isNaN(v), "summary field not NaN for " + bad);
      }
    }
  }

  @Test
  void tooFewDrawsOrChainsGiveNan() {
    double[][] three = normals(new Well19937c(4), 4, 3);
    assertTrue(Double.isNaN(Diagnostics.rankRhat(three)));
    assertTrue(Double.isNaN(Diagnostics.essBulk(three)));
    assertTrue(Double.isNaN(Diagnostics.mcseMean(three)));
    ParameterSummary s = Diagnostics.summarize(three);
    assertFalse(Double.isNaN(s.mean()));
    assertFalse(Double.isNaN(s.q50()));
    assertTrue(Double.isNaN(s.rhat()) && Double.isNaN(s.essBulk()));

    double[][] oneChain = normals(new Well19937c(4), 1, 400);
    assertTrue(Double.isNaN(Diagnostics.rankRhat(oneChain)));
    assertTrue(Double.isNaN(Diagnostics.splitRhat(oneChain)));
    assertEquals(1.0, Diagnostics.essBulk(oneChain) / 400, 0.4);

    double[][] singleDraw = {{1.5}};
    assertEquals(1.5, Diagnostics.summarize(singleDraw).mean(), 0.0);
    assertTrue(Double.isNaN(Diagnostics.summarize(singleDraw).sd()));
  }

  @Test
  void malformedInputIsRejectedWithAMessage() {
    IllegalArgumentException ragged =
        assertThrows(
            IllegalArgumentException.class,
            () -> Diagnostics.rankRhat(new double[][] {{1, 2, 3, 4}, {1, 2, 3}}));
    assertTrue(ragged.getMessage().contains("equal length"), ragged.getMessage());
    assertThrows(IllegalArgumentException.class, () -> Diagnostics.essBulk(null));
    assertThrows(IllegalArgumentException.class, () -> Diagnostics.essBulk(new double[0][]));
    assertThrows(IllegalArgumentException.class, () -> Diagnostics.summarize(new double[][] {{}}));
    double[][] ok = normals(new Well19937c(1), 2, 10);
    assertThrows(IllegalArgumentException.class, () -> Diagnostics.mcseQuantile(ok, 1.5));
    assertThrows(IllegalArgumentException.class, () -> Diagnostics.essQuantile(ok, Double.NaN));
  }

  // --- helpers -----------------------------------------------------------------------------------

  private static double[][] normals(RandomGenerator rng, int chains, int draws) {
    double[][] x = new double[chains][draws];
    for (double[] chain : x) {
      for (int t = 0; t < draws; t++) {
        chain[t] = rng.nextGaussian();
      }
    }
    return x;
  }

  /** Stationary AR(1) with unit marginal variance. */
  private static double[][] ar1(RandomGenerator rng, int chains, int draws, double rho) {
    double scale = Math.sqrt(1 - rho * rho);
    double[][] x = new double[chains][draws];
    for (double[] chain : x) {
      chain[0] = rng.nextGaussian();
      for (int t = 1; t < draws; t++) {
        chain[t] = rho * chain[t - 1] + scale * rng.nextGaussian();
      }
    }
    return x;
  }
}
