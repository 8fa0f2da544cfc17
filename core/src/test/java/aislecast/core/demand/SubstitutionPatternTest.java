package aislecast.core.demand;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.draws.ShopperDraws;
import org.junit.jupiter.api.Test;

/**
 * Why random coefficients: plain logit has independence of irrelevant alternatives, so a product's
 * lost sales go to the others in proportion to their shares; with random tastes over an attribute,
 * they go mostly to the products that share that attribute (Berry, Levinsohn and Pakes 1995,
 * section 2; Train, Discrete Choice Methods with Simulation, 3.3.2 and 6.2; common practice).
 */
class SubstitutionPatternTest {
  private static final int R = 2000;
  private static final int J = 5;
  /** One attribute: products 0 and 1 are near each other, 2 and 3 far on the other side. */
  private static final double[] X = {1.0, 1.1, -1.0, -1.2, 0.0};
  private static final double[] PRICE = {1.0, 1.0, 1.0, 1.0, 1.0};
  private static final double[] DELTA = {0.0, 0.2, 0.1, -0.1, 0.3};

  private static TestMarket market(double logL, double logSigma) {
    double[] nu = ShopperDraws.generate(42L, "substitution", R, 2);
    double[] psi = {Math.log(0.5), logSigma, logL};
    return TestMarket.of(R, J, 1, psi, nu, X, PRICE.clone(), DELTA);
  }

  private static double[] diversionFrom(TestMarket m, double[] s) {
    double[] probs = new double[R * J];
    ShareKernel.shares(R, J, m.delta, m.v, s, probs);
    double[] dsdp = new double[J * J];
    ShareKernel.jacobianPrice(R, J, probs, m.alpha, dsdp);
    double[] div = new double[J * (J + 1)];
    ShareKernel.diversion(J, dsdp, div);
    return div;
  }

  @Test
  void plainLogitDivertsInProportionToShares() {
    // IIA: diversion from j to k is s_k / (1 - s_j), to the outside s_0 / (1 - s_j).
    TestMarket m = market(-30.0, -30.0);
    double[] s = new double[J];
    double[] div = diversionFrom(m, s);
    double s0 = 1.0;
    for (double v : s) {
      s0 -= v;
    }
    for (int a = 0; a < J; a++) {
      for (int b = 0; b <= J; b++) {
        if (b == a) {
          continue;
        }
        double share = b == J ? s0 : s[b];
        assertEquals(share / (1 - s[a]), div[a * (J + 1) + b], 1e-10, a + "->" + b);
      }
    }
    // a price cut on product 0 takes the same fraction of every other product's share
    double[] before = s.clone();
    double[] after = sharesAfterCut(m, 0, 0.2);
    double loss = 1 - after[2] / before[2];
    assertTrue(loss > 0.0);
    for (int k = 1; k < J; k++) {
      assertEquals(loss, 1 - after[k] / before[k], 1e-10, "relative loss of product " + k);
    }
  }

  @Test
  void randomTastesDivertToTheMostSimilarProduct() {
    TestMarket m = market(Math.log(3.0), Math.log(0.3));
    double[] s = new double[J];
    double[] div = diversionFrom(m, s);
    int w = J + 1;
    // diversion from product 0 relative to the IIA benchmark s_k / (1 - s_0)
    double[] ratio = new double[J];
    for (int k = 1; k < J; k++) {
      ratio[k] = div[k] / (s[k] / (1 - s[0]));
    }
    assertTrue(ratio[1] > 1.0, "product 1 gets more than its share-proportional amount: " + ratio[1]);
    for (int k = 2; k < J; k++) {
      assertTrue(ratio[1] > ratio[k], "product 1 over product " + k);
    }
    assertTrue(ratio[2] < 1.0 && ratio[3] < 1.0, "dissimilar products get less than IIA");
    assertTrue(div[0 * w + 1] > div[0 * w + 4] && div[0 * w + 1] > div[0 * w + 2]);

    // a finite price cut on product 0: product 1 loses the largest fraction of its share
    double[] after = sharesAfterCut(m, 0, 0.2);
    double loss1 = 1 - after[1] / s[1];
    for (int k = 2; k < J; k++) {
      double lossK = 1 - after[k] / s[k];
      assertTrue(loss1 > lossK, "product 1 loses " + loss1 + ", product " + k + " " + lossK);
    }
    // and more share in absolute terms than proportionality to its share would give
    double gained = after[0] - s[0];
    double lost1 = s[1] - after[1];
    double othersBefore = 1 - s[0];
    assertTrue(lost1 > gained * s[1] / othersBefore, "absolute loss of the close substitute");
  }

  private static double[] sharesAfterCut(TestMarket m, int product, double cut) {
    double[] p = m.price.clone();
    p[product] -= cut;
    double[] s = new double[J];
    ShareKernel.shares(R, J, m.delta, m.utilityAt(p), s, null);
    return s;
  }
}
