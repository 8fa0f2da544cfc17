package aislecast.core.estimate;

import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import java.util.Arrays;
import org.apache.commons.math3.stat.inference.ChiSquareTest;
import org.junit.jupiter.api.Test;

/**
 * Simulation-based calibration (Talts, Betancourt, Simpson, Vehtari and Gelman 2018,
 * "Validating Bayesian inference algorithms with simulation-based calibration", arXiv:1804.06788):
 * for data drawn from the prior predictive, the rank of each true parameter among (thinned)
 * posterior draws is uniform if and only if the sampler targets the right posterior. Checked for
 * {@code lambda}, {@code a} (the mean log price sensitivity, Gamma[0,0]) and {@code sigma_xi2},
 * by a chi-square test of the rank histogram at level 0.001 per parameter (commons-math3).
 *
 * <p>Sizes were set before looking at any result: 100 replications, 4 stores x 6 weeks x 3
 * products, 2 chains x 150 warmup + 200 sampling sweeps, thinned by 20 to 20 draws (ranks 0..20),
 * histogram of 7 bins of 3 ranks.
 */
class SimulationBasedCalibrationTest {
  private static final int REPLICATIONS = 100;
  private static final int THIN = 20;
  private static final int BINS = 7;

  @Test
  void ranksOfTrueValuesAreUniform() {
    Priors pr = PriorPredictive.priors();
    String[] names = {"lambda", "Gamma[0,0]", "sigma_xi2"};
    long[][] hist = rankHistograms(pr, names, REPLICATIONS, (data, set) -> null);
    double[] expected = new double[BINS];
    Arrays.fill(expected, REPLICATIONS / (double) BINS);
    ChiSquareTest chi = new ChiSquareTest();
    StringBuilder report = new StringBuilder();
    boolean ok = true;
    for (int q = 0; q < names.length; q++) {
      double pValue = chi.chiSquareTest(expected, hist[q]);
      report.append(names[q]).append(' ').append(Arrays.toString(hist[q]))
          .append(String.format(" p=%.4f%n", pValue));
      ok &= pValue > 0.001;
    }
    System.out.print(report);
    assertTrue(ok, "rank histograms not uniform at level 0.001:\n" + report);
  }

  /**
   * Rank histograms (7 bins of 3 ranks over 20 thinned draws) of the named parameters' true
   * values over {@code reps} prior-predictive replications; {@code hooks} may add a sweep hook
   * per data set (probes), null for none.
   */
  static long[][] rankHistograms(Priors pr, String[] names, int reps,
      java.util.function.BiFunction<PriorPredictive, SamplerSettings, InProcessRunner.SweepHook> hooks) {
    long[][] hist = new long[names.length][BINS];
    for (int rep = 0; rep < reps; rep++) {
      PriorPredictive data = new PriorPredictive(1000 + rep, pr);
      SamplerSettings set = new SamplerSettings(2, 150, 200, 2, 16, 0.8, 77 + rep, false, true,
          SamplerSettings.DEFAULT_MOMENTUM_PERSISTENCE);
      var res = InProcessRunner.run(data.stores, data.catalog, 1, 1, 1, pr, set,
          new InProcessRunner.Start(null, null, false, hooks.apply(data, set)));
      String[] all = Globals.parameterNames(res.dims());
      double[] truth = data.truth.toFlat();
      for (int q = 0; q < names.length; q++) {
        int p = Arrays.asList(all).indexOf(names[q]);
        int rank = 0;
        for (int c = 0; c < 2; c++) {
          for (int i = THIN - 1; i < set.samplingSweeps(); i += THIN) {
            if (res.globalDraws()[c][i][p] < truth[p]) {
              rank++;
            }
          }
        }
        // 20 draws: rank in 0..20, 21 values, 7 bins of 3
        hist[q][rank / 3]++;
      }
    }
    return hist;
  }
}
