package aislecast.core.estimate;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;

import aislecast.core.mcmc.Welford;
import org.junit.jupiter.api.Test;

class DriverStateTest {
  @Test
  void ridgeProposalSdIsTheScaleTimesEachRowLengthOfTheFactor() {
    // factor [[1, 0], [3, 4]] at scale 2: proposal covariance 4 L L' = [[4, 12], [12, 100]], so
    // the sds are 2 and 10 (hand arithmetic); a second chain at scale 0.5 with the identity
    DriverState st = new DriverState(null, new double[] {2.0, 0.5},
        new double[][] {{1, 0, 3, 4}, {1, 0, 0, 1}}, new Welford[2], new double[2][2],
        new long[2], new long[2], 0);
    assertArrayEquals(new double[] {2.0, 10.0}, st.ridgeProposalSd(0), 1e-15);
    assertArrayEquals(new double[] {0.5, 0.5}, st.ridgeProposalSd(1), 1e-15);
  }
}
