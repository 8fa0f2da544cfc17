package aislecast.core.estimate;

import aislecast.core.globals.Priors;
import java.util.Arrays;
import org.apache.commons.math3.stat.inference.ChiSquareTest;

/**
 * Probe: simulation-based calibration (Talts et al. 2018) of more parameters than the test
 * checks (the hierarchy's variances and taste mean, the intercept spread), same sizes as
 * {@link SimulationBasedCalibrationTest}. {@code AFFINE=1} adds {@link AffineTasteHook}, so its
 * exactness can be judged the same way. Prints each rank histogram and its chi-square p-value.
 * Usage: {@code SbcProbe <replications>}.
 */
public final class SbcProbe {
  public static void main(String[] args) {
    int reps = Integer.parseInt(args[0]);
    int bins = 7;
    Priors pr = PriorPredictive.priors();
    String[] names = {"lambda", "Gamma[0,0]", "Gamma[0,1]", "Gamma[0,2]", "V_psi[0,0]",
        "V_psi[1,1]", "V_psi[2,2]", "tau2", "sigma_xi2", "sigma_p2"};
    boolean affine = System.getenv("AFFINE") != null;
    long[][] hist = SimulationBasedCalibrationTest.rankHistograms(pr, names, reps,
        (data, set) -> affine ? new AffineTasteHook(set.warmupSweeps(), pr, data.catalog.x(),
            data.catalog.attributes(), set.seed(), false) : null);
    double[] expected = new double[bins];
    Arrays.fill(expected, reps / (double) bins);
    ChiSquareTest chi = new ChiSquareTest();
    for (int q = 0; q < names.length; q++) {
      System.out.printf("%-12s %s p=%.4f%n", names[q], Arrays.toString(hist[q]),
          chi.chiSquareTest(expected, hist[q]));
    }
  }
}
