package aislecast.core.globals;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Monte Carlo moment checks with tolerances from the Monte Carlo error (common practice): a sample
 * mean is compared with {@code Z * sd/sqrt(N)}, a sample covariance element with {@code Z} times
 * the standard error of the mean of the centred products {@code (x_a - m_a)(x_b - m_b)}, estimated
 * from the same sample.
 */
final class McCheck {
  /** Five standard errors: a false alarm per comparison has probability about 6e-7. */
  static final double Z = 5.0;

  private McCheck() {}

  /** Checks the sample mean and covariance of {@code draws} (N x d) against mean and cov. */
  static void checkMoments(double[][] draws, double[] mean, double[] cov, String what) {
    int n = draws.length;
    int d = mean.length;
    double[] m = new double[d];
    for (double[] x : draws) {
      for (int a = 0; a < d; a++) {
        m[a] += x[a] / n;
      }
    }
    for (int a = 0; a < d; a++) {
      double se = Math.sqrt(cov[a * d + a] / n);
      assertTrue(
          Math.abs(m[a] - mean[a]) <= Z * se,
          what + ": mean[" + a + "] " + m[a] + " vs " + mean[a] + " (se " + se + ")");
    }
    for (int a = 0; a < d; a++) {
      for (int b = 0; b <= a; b++) {
        double s1 = 0.0;
        double s2 = 0.0;
        for (double[] x : draws) {
          double p = (x[a] - m[a]) * (x[b] - m[b]);
          s1 += p;
          s2 += p * p;
        }
        double c = s1 / (n - 1);
        double varP = s2 / n - (s1 / n) * (s1 / n);
        double se = Math.sqrt(varP / n);
        assertTrue(
            Math.abs(c - cov[a * d + b]) <= Z * se + 1e-12,
            what + ": cov[" + a + "," + b + "] " + c + " vs " + cov[a * d + b] + " (se " + se
                + ")");
      }
    }
  }

  /** Scalar version. */
  static void checkMoments(double[] draws, double mean, double var, String what) {
    double[][] x = new double[draws.length][];
    for (int i = 0; i < draws.length; i++) {
      x[i] = new double[] {draws[i]};
    }
    checkMoments(x, new double[] {mean}, new double[] {var}, what);
  }
}
