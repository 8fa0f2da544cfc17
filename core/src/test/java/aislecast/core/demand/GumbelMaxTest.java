package aislecast.core.demand;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.distribution.GumbelDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;

/**
 * Simulated choices: utility plus iid standard Gumbel errors, argmax over products and the outside
 * option. Their frequencies must match the logit probabilities (McFadden 1974, "Conditional logit
 * analysis of qualitative choice behavior"; Train, Discrete Choice Methods with Simulation, 3.10).
 * Errors come from commons-math3's GumbelDistribution with a seeded Well19937c, utilities are built
 * here from psi without {@link Heterogeneity}, so this also checks the taste construction.
 */
class GumbelMaxTest {
  /** Four and a half binomial standard errors: a false alarm about once in 150,000 comparisons. */
  private static final double Z = 4.5;

  /** Index of the chosen alternative: 0..J-1 a product, J the outside option (utility 0). */
  private static int choose(double[] u, int j, GumbelDistribution gumbel) {
    int best = j;
    double bestU = gumbel.sample();
    for (int p = 0; p < j; p++) {
      double w = u[p] + gumbel.sample();
      if (w > bestU) {
        bestU = w;
        best = p;
      }
    }
    return best;
  }

  @Test
  void plainLogitChoiceFrequenciesMatchTheLogitProbabilities() {
    int j = 4;
    double[] delta = {0.5, -0.3, 1.0, 0.0};
    double[] price = {1.0, 0.5, 2.0, 1.5};
    double alpha = 0.9;
    double[] u = new double[j];
    double[] v = new double[j];
    for (int p = 0; p < j; p++) {
      v[p] = -alpha * price[p];
      u[p] = delta[p] + v[p];
    }
    double[] s = new double[j];
    double s0 = ShareKernel.shares(1, j, delta, v, s, null);

    GumbelDistribution gumbel = new GumbelDistribution(new Well19937c(1974L), 0.0, 1.0);
    int n = 200_000;
    int[] count = new int[j + 1];
    for (int t = 0; t < n; t++) {
      count[choose(u, j, gumbel)]++;
    }
    for (int p = 0; p <= j; p++) {
      double prob = p == j ? s0 : s[p];
      double freq = count[p] / (double) n;
      double se = Math.sqrt(prob * (1 - prob) / n);
      assertEquals(prob, freq, Z * se, "alternative " + p);
    }
  }

  @Test
  void randomCoefficientsChoiceFrequenciesMatchPerShopperAndInAggregate() {
    int r = 40;
    int j = 4;
    int kx = 2;
    // strong heterogeneity so shoppers really differ
    double[] psi = {Math.log(0.8), Math.log(0.7), Math.log(1.5), Math.log(0.8), 0.6};
    TestMarket m = TestMarket.random(31L, r, j, kx, psi);
    double[] probs = new double[r * j];
    double[] s = new double[j];
    double s0 = ShareKernel.shares(r, j, m.delta, m.v, s, probs);

    // the model written out: alpha_r = exp(a + sigma nu_r0), beta_r = L nu_r[1..2],
    // L = [[exp(psi2), 0], [psi4, exp(psi3)]] (DESIGN section 4)
    double l11 = Math.exp(psi[2]);
    double l22 = Math.exp(psi[3]);
    double l21 = psi[4];
    GumbelDistribution gumbel = new GumbelDistribution(new Well19937c(1995L), 0.0, 1.0);
    int perShopper = 20_000;
    int[] total = new int[j + 1];
    double[] u = new double[j];
    double[] varSum = new double[j + 1];
    for (int i = 0; i < r; i++) {
      double nu0 = m.nu[i * 3];
      double nu1 = m.nu[i * 3 + 1];
      double nu2 = m.nu[i * 3 + 2];
      double alpha = Math.exp(psi[0] + Math.exp(psi[1]) * nu0);
      double b1 = l11 * nu1;
      double b2 = l21 * nu1 + l22 * nu2;
      double p0 = 1.0;
      for (int p = 0; p < j; p++) {
        u[p] = m.delta[p] - alpha * m.price[p] + m.x[p * kx] * b1 + m.x[p * kx + 1] * b2;
        p0 -= probs[i * j + p];
      }
      int[] count = new int[j + 1];
      for (int t = 0; t < perShopper; t++) {
        count[choose(u, j, gumbel)]++;
      }
      for (int p = 0; p <= j; p++) {
        double prob = p == j ? p0 : probs[i * j + p];
        double se = Math.sqrt(prob * (1 - prob) / perShopper);
        assertEquals(prob, count[p] / (double) perShopper, Z * se + 1e-12,
            "shopper " + i + ", alternative " + p);
        total[p] += count[p];
        varSum[p] += prob * (1 - prob) * perShopper;
      }
    }
    double n = (double) r * perShopper;
    for (int p = 0; p <= j; p++) {
      double share = p == j ? s0 : s[p];
      assertTrue(share > 0.01, "a meaningful share");
      assertEquals(share, total[p] / n, Z * Math.sqrt(varSum[p]) / n, "market share " + p);
    }
  }
}
