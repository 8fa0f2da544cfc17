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

  /** Share of a {@code V_psi} diagonal entry's posterior mean that its prior supplies, above
   * which a note is written. */
  public static final double HIERARCHY_SHARE_LIMIT = 0.5;

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

  /**
   * Notes for the diagonal of {@code V_psi} where the Inv-Wishart prior supplies more than
   * {@link #HIERARCHY_SHARE_LIMIT} of the posterior mean. Given the stores' deviations {@code e_s
   * = psi_s - Gamma' d_s}, {@code V_psi ~ Inv-Wishart(nu0 + n, S0 + sum e e')}, whose mean is
   * {@code (S0 + sum e e') / (nu0 + n - p - 1)} (Gelman et al., Bayesian Data Analysis, 3rd ed.,
   * appendix A). Averaged over the posterior, {@code S0_kk + E[sum e_k^2] = m_kk (nu0 + n - p - 1)}
   * with {@code m} the posterior mean, so the prior's share of entry {@code k} is {@code S0_kk /
   * (m_kk (nu0 + n - p - 1))}: above one half, the store-to-store spread reported for that
   * component says more about the prior than about the stores. On simulated data with 20 stores
   * the default prior made the spread of {@code a} and {@code log sigma} 3-4 times the truth
   * (README, "Priors that pull").
   *
   * @param stores number of stores n in the fit
   */
  public static List<String> hierarchyNotes(Priors priors, String[] names,
      ParameterSummary[] summaries, int stores) {
    List<String> notes = new ArrayList<>();
    int p = priors.vPsi().dim();
    double[] s0 = priors.vPsi().scale();
    double dfPost = priors.vPsi().df() + stores - p - 1;
    List<String> all = java.util.Arrays.asList(names);
    for (int k = 0; k < p; k++) {
      int q = all.indexOf("V_psi[" + k + "," + k + "]");
      double mean = q < 0 ? Double.NaN : summaries[q].mean();
      if (!(mean > 0) || !(dfPost > 0)) {
        continue;
      }
      double share = s0[k * p + k] / (mean * dfPost);
      if (share > HIERARCHY_SHARE_LIMIT) {
        notes.add(String.format(Locale.ROOT,
            "prior of %s: the Inv-Wishart prior supplies about %.0f%% of its posterior mean"
                + " %s (prior scale S0_kk %s, %d stores), so the store-to-store spread of this"
                + " heterogeneity component reflects the prior more than the stores. Consider a"
                + " smaller priors.v_psi_scale (README, \"Priors that pull\")",
            names[q], 100 * Math.min(share, 1.0), digits4(mean), digits4(s0[k * p + k]),
            stores));
      }
    }
    return notes;
  }

  /** Four significant digits without trailing zeros (0.072, 1.1). */
  private static String digits4(double v) {
    return new java.math.BigDecimal(v).round(new java.math.MathContext(4)).stripTrailingZeros()
        .toPlainString();
  }

  private static String plain(double v) {
    return v == Math.rint(v) && Math.abs(v) < 1e9 ? Long.toString((long) v)
        : Double.toString(v);
  }
}
