package aislecast.core.estimate;

import aislecast.core.diag.ParameterSummary;
import aislecast.core.globals.InvGamma;
import aislecast.core.globals.Priors;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Flags variance priors that sit far above where the posterior puts the variance. For
 * {@code s2 ~ Inv-Gamma(a, b)} the log prior's slope in {@code log s2} is {@code b / s2 - (a + 1)}
 * (differentiate {@code -(a + 1) log s2 - b / s2}, Gelman et al., Bayesian Data Analysis, 3rd
 * ed., appendix A): when the scale {@code b} is many times {@code s2}, the prior pushes the
 * variance up with that force. Along a direction the data pin firmly that costs little, but the
 * price-equation noise {@code sigma_p2} trades off against the demand-shock variance, the price
 * sensitivity and the intercept level, which the data pin weakly; on simulated data the default
 * scale (0.5, about 80 times a price noise of sd 0.08) made own-price elasticities 4-10% less
 * elastic than the truth with 20 stores (README, "Priors that pull").
 */
public final class PriorPull {
  /** Ratio of prior scale to posterior mean above which a note is written. */
  public static final double RATIO_LIMIT = 20.0;

  private PriorPull() {}

  /**
   * Notes for {@code tau2}, {@code sigma_xi2} and {@code sigma_p2} whose inverse-gamma prior scale
   * is more than {@link #RATIO_LIMIT} times their posterior mean; empty when none is.
   *
   * @param names parameter names as in {@link aislecast.core.globals.Globals#parameterNames}
   * @param summaries their posterior summaries, same order
   */
  public static List<String> varianceNotes(Priors priors, String[] names,
      ParameterSummary[] summaries) {
    List<String> notes = new ArrayList<>();
    for (int p = 0; p < names.length; p++) {
      InvGamma prior = switch (names[p]) {
        case "tau2" -> priors.tau2();
        case "sigma_xi2" -> priors.sigmaXi2();
        case "sigma_p2" -> priors.sigmaP2();
        default -> null;
      };
      double mean = summaries[p].mean();
      if (prior == null || !(mean > 0)) {
        continue;
      }
      double ratio = prior.scale() / mean;
      if (ratio > RATIO_LIMIT) {
        notes.add(String.format(Locale.ROOT,
            "prior of %s: its Inv-Gamma(%s, %s) scale is %.0f times the posterior mean %.4g,"
                + " so the prior pushes this variance up; on simulated data (20 stores) the"
                + " sigma_p2 prior at such a distance made own-price elasticities 4-10%% less"
                + " elastic than the truth. %s (README, \"Priors that pull\")",
            names[p], plain(prior.shape()), plain(prior.scale()), ratio, mean,
            names[p].equals("sigma_p2")
                ? "Consider priors.price_noise_scale: auto (the scale at the price noise the data"
                    + " show) or a number near the posterior mean"
                : "Consider a smaller priors.variance_scale, near the variance the data show"));
      }
    }
    return notes;
  }

  private static String plain(double v) {
    return v == Math.rint(v) && Math.abs(v) < 1e9 ? Long.toString((long) v)
        : Double.toString(v);
  }
}
