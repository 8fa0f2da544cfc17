package aislecast.core.globals;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;

class DistributionsTest {
  private static final int N = 20_000;

  static RealMatrix matrix(double[] a, int n) {
    double[][] m = new double[n][n];
    for (int i = 0; i < n; i++) {
      for (int k = 0; k < n; k++) {
        m[i][k] = a[i * n + k];
      }
    }
    return new Array2DRowRealMatrix(m);
  }

  static double[] flat(RealMatrix m) {
    int n = m.getRowDimension();
    double[] out = new double[n * m.getColumnDimension()];
    for (int i = 0; i < n; i++) {
      for (int k = 0; k < m.getColumnDimension(); k++) {
        out[i * m.getColumnDimension() + k] = m.getEntry(i, k);
      }
    }
    return out;
  }

  /** A A' + n I for a seeded random A: symmetric positive definite. */
  static double[] randomSpd(int n, long seed) {
    Well19937c rng = new Well19937c(seed);
    double[] a = new double[n * n];
    for (int i = 0; i < a.length; i++) {
      a[i] = rng.nextGaussian();
    }
    double[] s = new double[n * n];
    for (int i = 0; i < n; i++) {
      for (int k = 0; k < n; k++) {
        double v = i == k ? n : 0.0;
        for (int m = 0; m < n; m++) {
          v += a[i * n + m] * a[k * n + m];
        }
        s[i * n + k] = v;
      }
    }
    return s;
  }

  // Reference: commons-math3 LU decomposition (an independent linear-algebra library):
  // mean = Q^-1 b, covariance = Q^-1.
  @Test
  void gaussianMeanAndCovarianceMatchIndependentSolve() {
    int n = 5;
    double[] q = randomSpd(n, 3);
    double[] b = {1.0, -2.0, 0.5, 3.0, 0.0};
    Gaussian g = new Gaussian(q, b, n);
    RealMatrix inv = new LUDecomposition(matrix(q, n)).getSolver().getInverse();
    double[] mean = inv.operate(new ArrayRealVector(b)).toArray();
    double[] cov = flat(inv);
    double[] m = g.mean();
    double[] c = g.covariance();
    for (int i = 0; i < n; i++) {
      assertEquals(mean[i], m[i], 1e-12);
    }
    for (int i = 0; i < n * n; i++) {
      assertEquals(cov[i], c[i], 1e-12);
    }
    double[][] draws = new double[N][];
    Well19937c rng = new Well19937c(4);
    for (int t = 0; t < N; t++) {
      draws[t] = g.sample(rng);
    }
    McCheck.checkMoments(draws, mean, cov, "Gaussian");
  }

  // Gelman et al., BDA3, appendix A: Inv-Gamma(a, b) has mean b/(a-1), variance
  // b^2/((a-1)^2 (a-2)).
  @Test
  void inverseGammaMomentsMatchClosedForm() {
    double a = 7.0;
    double b = 3.0;
    InvGamma ig = new InvGamma(a, b);
    double mean = b / (a - 1);
    double var = b * b / ((a - 1) * (a - 1) * (a - 2));
    assertEquals(mean, ig.mean(), 1e-15);
    assertEquals(var, ig.variance(), 1e-15);
    Well19937c rng = new Well19937c(5);
    double[] x = new double[N];
    for (int t = 0; t < N; t++) {
      x[t] = ig.sample(rng);
    }
    McCheck.checkMoments(x, mean, var, "Inv-Gamma");
  }

  // Gelman et al., BDA3, appendix A: E[Inv-Wishart(nu, S)] = S/(nu - p - 1), and V^-1 is
  // Wishart(nu, S^-1) with mean nu S^-1 (S^-1 from commons-math3).
  // Element variances (Press 1982, Applied Multivariate Analysis, as quoted from memory):
  // Var(V_ij) = ((nu-p+1) S_ij^2 + (nu-p-1) S_ii S_jj) / ((nu-p)(nu-p-1)^2(nu-p-3)).
  @Test
  void inverseWishartMomentsMatchClosedForm() {
    int p = 3;
    double nu = 12.0;
    double[] s = randomSpd(p, 6);
    InvWishart iw = new InvWishart(nu, s, p);
    double[] mean = new double[p * p];
    double[] var = new double[p * p];
    for (int i = 0; i < p; i++) {
      for (int k = 0; k < p; k++) {
        mean[i * p + k] = s[i * p + k] / (nu - p - 1);
        var[i * p + k] =
            ((nu - p + 1) * s[i * p + k] * s[i * p + k] + (nu - p - 1) * s[i * p + i] * s[k * p + k])
                / ((nu - p) * (nu - p - 1) * (nu - p - 1) * (nu - p - 3));
      }
    }
    double[] m = iw.mean();
    for (int i = 0; i < p * p; i++) {
      assertEquals(mean[i], m[i], 1e-12);
    }
    double[] sInv = flat(new LUDecomposition(matrix(s, p)).getSolver().getInverse());
    Well19937c rng = new Well19937c(7);
    double[][] v = new double[N][];
    double[][] w = new double[N][];
    for (int t = 0; t < N; t++) {
      v[t] = iw.sample(rng);
      w[t] = flat(new LUDecomposition(matrix(v[t], p)).getSolver().getInverse());
    }
    // Each element of V as a scalar: mean and closed-form variance.
    for (int e = 0; e < p * p; e++) {
      double[] x = new double[N];
      for (int t = 0; t < N; t++) {
        x[t] = v[t][e];
      }
      McCheck.checkMoments(x, mean[e], var[e], "Inv-Wishart element " + e);
    }
    // Means of the Wishart V^-1, with the Monte Carlo standard error from the sample.
    for (int e = 0; e < p * p; e++) {
      double sum = 0;
      double sum2 = 0;
      for (int t = 0; t < N; t++) {
        sum += w[t][e];
        sum2 += w[t][e] * w[t][e];
      }
      double mw = sum / N;
      double se = Math.sqrt((sum2 / N - mw * mw) / N);
      assertEquals(nu * sInv[e], mw, McCheck.Z * se, "Wishart mean element " + e);
    }
  }

  @Test
  void rejectsInvalidParameters() {
    assertThrows(IllegalArgumentException.class, () -> new InvGamma(-1, 1));
    assertThrows(IllegalArgumentException.class, () -> new InvGamma(1, 0));
    assertThrows(IllegalArgumentException.class, () -> new Normal(0, 0));
    assertThrows(
        IllegalArgumentException.class, () -> new InvWishart(0.5, new double[] {1, 0, 0, 1}, 2));
    assertThrows(
        IllegalArgumentException.class, () -> new InvWishart(5, new double[] {1, 2, 2, 1}, 2));
    assertThrows(
        IllegalArgumentException.class, () -> new Gaussian(new double[] {1, 2, 0, 1}, new double[2], 2));
    assertThrows(
        IllegalStateException.class,
        () -> new Gaussian(new double[] {1, 2, 2, 1}, new double[2], 2).mean());
  }
}
