package aislecast.core.estimate;

import aislecast.core.model.StoreData;
import java.util.List;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.SingularOps_DDRM;
import org.ejml.dense.row.linsol.svd.SolvePseudoInverseSvd_DDRM;

/**
 * A first-pass least-squares fit of the price equation without its demand-shock term: log price
 * on product dummies and cost shifters. Its residual variance estimates {@code sigma_p^2 +
 * lambda^2 sigma_xi^2} (the shock is left in the residual), the size of the price noise the data
 * show; {@code priors.price_noise_scale: auto} puts the inverse-gamma prior's scale there
 * (README, "Priors that pull").
 */
public final class FirstPass {
  private FirstPass() {}

  /** Residual variance over every row of every store ({@link #residualVariance}). */
  public static double priceResidualVariance(List<StoreData> stores, int products, int kc) {
    Normal eq = new Normal(products + kc);
    double[] row = new double[products + kc];
    for (StoreData d : stores) {
      for (int r = 0; r < d.rows(); r++) {
        java.util.Arrays.fill(row, 0.0);
        row[d.product[r]] = 1.0;
        System.arraycopy(d.c, r * d.kc, row, products, kc);
        eq.add(row, d.logPrice[r]);
      }
    }
    return eq.residualVariance();
  }

  /**
   * Residual variance of the least-squares fit of {@code y} on the {@code n x p} design {@code x}
   * (row-major, no intercept added): residual sum of squares over {@code n - rank}. Columns the
   * data leave empty (a product without rows) do not count in the rank.
   */
  public static double residualVariance(double[] x, double[] y, int n, int p) {
    Normal eq = new Normal(p);
    double[] row = new double[p];
    for (int i = 0; i < n; i++) {
      System.arraycopy(x, i * p, row, 0, p);
      eq.add(row, y[i]);
    }
    return eq.residualVariance();
  }

  /** Accumulated normal equations {@code X'X, X'y, y'y}. */
  private static final class Normal {
    final int p;
    final double[] xtx;
    final double[] xty;
    double yty;
    long n;

    Normal(int p) {
      this.p = p;
      this.xtx = new double[p * p];
      this.xty = new double[p];
    }

    void add(double[] row, double y) {
      for (int i = 0; i < p; i++) {
        double ri = row[i];
        if (ri == 0.0) {
          continue;
        }
        xty[i] += ri * y;
        for (int k = 0; k < p; k++) {
          xtx[i * p + k] += ri * row[k];
        }
      }
      yty += y * y;
      n++;
    }

    double residualVariance() {
      // drop columns the data never touch, then solve by the SVD pseudo-inverse (EJML), whose
      // decomposition also gives the rank
      int[] keep = new int[p];
      int q = 0;
      for (int i = 0; i < p; i++) {
        if (xtx[i * p + i] > 0) {
          keep[q++] = i;
        }
      }
      DMatrixRMaj a = new DMatrixRMaj(q, q);
      DMatrixRMaj b = new DMatrixRMaj(q, 1);
      for (int i = 0; i < q; i++) {
        b.set(i, 0, xty[keep[i]]);
        for (int k = 0; k < q; k++) {
          a.set(i, k, xtx[keep[i] * p + keep[k]]);
        }
      }
      SolvePseudoInverseSvd_DDRM solver = new SolvePseudoInverseSvd_DDRM();
      if (!solver.setA(a)) {
        return Double.NaN;
      }
      DMatrixRMaj beta = new DMatrixRMaj(q, 1);
      solver.solve(b, beta);
      int rank = SingularOps_DDRM.rank(solver.getDecomposition(), SingularOps_DDRM.singularThreshold(
          solver.getDecomposition()));
      double fitted = CommonOps_DDRM.dot(beta, b);
      double df = n - rank;
      return df > 0 ? Math.max(yty - fitted, 0.0) / df : Double.NaN;
    }
  }
}
