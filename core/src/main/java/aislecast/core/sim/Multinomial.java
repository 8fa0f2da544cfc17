package aislecast.core.sim;

import org.apache.commons.math3.distribution.BinomialDistribution;
import org.apache.commons.math3.random.RandomGenerator;

/**
 * Exact multinomial draws by sequential conditional binomials: {@code q_1 ~ Bin(n, p_1)}, then
 * {@code q_k ~ Bin(n - q_1 - .. - q_{k-1}, p_k / (1 - p_1 - .. - p_{k-1}))}; the last category
 * (the outside option) takes the rest. The binomials are commons-math3's {@link
 * BinomialDistribution}, sampled by inversion, so the draws are a pure function of the generator.
 */
public final class Multinomial {
  private Multinomial() {}

  /**
   * @param rng generator, advanced
   * @param n number of trials, >= 0
   * @param probs probabilities of the first k categories, not modified; their sum must not exceed
   *     1 (the remainder is the last, implicit category)
   * @param k number of explicit categories
   * @param countsOut modified: counts of the first k categories
   * @return the count of the implicit last category, {@code n - sum(countsOut)}
   */
  public static long sample(RandomGenerator rng, int n, double[] probs, int k, long[] countsOut) {
    if (n < 0) {
      throw new IllegalArgumentException("negative number of trials: " + n);
    }
    double total = 0.0;
    for (int i = 0; i < k; i++) {
      double p = probs[i];
      if (!(p >= 0.0 && p <= 1.0)) {
        throw new IllegalArgumentException("probability " + i + " not in [0, 1]: " + p);
      }
      total += p;
    }
    if (total > 1.0 + 1e-9) {
      throw new IllegalArgumentException("probabilities sum to " + total + " > 1");
    }
    int left = n;
    double massLeft = 1.0;
    for (int i = 0; i < k; i++) {
      int q;
      if (left == 0 || probs[i] == 0.0) {
        q = 0;
      } else {
        // massLeft can fall a hair below probs[i] by rounding: clamp rather than fail
        double p = massLeft <= probs[i] ? 1.0 : probs[i] / massLeft;
        q = p >= 1.0 ? left : new BinomialDistribution(rng, left, p).sample();
      }
      countsOut[i] = q;
      left -= q;
      massLeft -= probs[i];
    }
    return left;
  }
}
