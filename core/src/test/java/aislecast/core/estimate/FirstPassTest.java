package aislecast.core.estimate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.sim.SimSettings;
import java.util.SplittableRandom;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.junit.jupiter.api.Test;

/**
 * The first-pass price regression against commons-math3's {@code OLSMultipleLinearRegression}
 * (QR least squares; {@code estimateErrorVariance} = residual sum of squares / (n - p)), and on
 * data simulated from the model against the variance of what it leaves in the residual,
 * {@code sigma_p^2 + lambda^2 sigma_xi^2} (the price equation with the shock omitted; the cost
 * shifters are drawn independently of the shocks, so least squares is unbiased for the rest).
 */
class FirstPassTest {

  @Test
  void residualVarianceMatchesCommonsMathOnADummyDesign() {
    SplittableRandom rng = new SplittableRandom(7);
    int n = 400;
    int groups = 6;
    int p = groups + 2;
    double[] x = new double[n * p];
    double[] y = new double[n];
    double[][] xm = new double[n][p];
    for (int i = 0; i < n; i++) {
      int g = rng.nextInt(groups);
      x[i * p + g] = 1;
      x[i * p + groups] = rng.nextDouble() * 2 - 1;
      x[i * p + groups + 1] = rng.nextDouble();
      y[i] = 0.3 * g - 0.5 * x[i * p + groups] + 0.8 * x[i * p + groups + 1]
          + 0.2 * (rng.nextDouble() - 0.5);
      System.arraycopy(x, i * p, xm[i], 0, p);
    }
    OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
    ols.setNoIntercept(true);
    ols.newSampleData(y, xm);
    double expected = ols.estimateErrorVariance();
    assertEquals(expected, FirstPass.residualVariance(x, y, n, p), 1e-9 * expected);
  }

  @Test
  void anEmptyColumnDoesNotCountInTheRank() {
    // the same data with a product that never sells: its dummy column is all zero
    SplittableRandom rng = new SplittableRandom(8);
    int n = 120;
    double[] x = new double[n * 3];
    double[] x2 = new double[n * 2];
    double[] y = new double[n];
    for (int i = 0; i < n; i++) {
      x[i * 3] = 1;
      x[i * 3 + 2] = rng.nextDouble();
      x2[i * 2] = 1;
      x2[i * 2 + 1] = x[i * 3 + 2];
      y[i] = 1 + x[i * 3 + 2] + rng.nextDouble();
    }
    double v = FirstPass.residualVariance(x2, y, n, 2);
    assertEquals(v, FirstPass.residualVariance(x, y, n, 3), 1e-12 * v);
  }

  @Test
  void onSimulatedDataItMeasuresPriceNoisePlusTheShocksShare() {
    SimFixture f = new SimFixture(SimSettings.demo().withSizes(20, 26, 12, 3, 3, 20));
    var sim = f.sim;
    int nJ = sim.products();
    double[] y = new double[sim.rows];
    double[][] xm = new double[sim.rows][nJ + 1];
    for (int i = 0; i < sim.rows; i++) {
      y[i] = Math.log(sim.price[i]);
      xm[i][sim.rowProduct[i]] = 1.0;
      xm[i][nJ] = Math.log(sim.unitCost[i]);
    }
    OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
    ols.setNoIntercept(true);
    ols.newSampleData(y, xm);
    double got = FirstPass.priceResidualVariance(f.stores, nJ, 1);
    assertEquals(ols.estimateErrorVariance(), got, 1e-8 * got, "same rows, same fit");
    double omitted = f.truth.sigmaP2() + f.truth.lambda() * f.truth.lambda() * f.truth.sigmaXi2();
    // n = 4,231 rows: the variance estimate's relative sd is about sqrt(2 / n) = 2%
    assertEquals(omitted, got, 0.1 * omitted, "sigma_p2 + lambda^2 sigma_xi2");
    assertTrue(got > 1.5 * f.truth.sigmaP2(), "the shock's share is in it: " + got);
  }
}
