package aislecast.jobs.config;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.globals.InvGamma;
import aislecast.core.globals.InvWishart;
import aislecast.core.globals.Normal;
import aislecast.core.globals.Priors;
import com.fasterxml.jackson.annotation.JsonCreator;
import com.fasterxml.jackson.annotation.JsonProperty;

/**
 * Priors of the global parameters ({@code priors:} section; DESIGN section 4). Every key is
 * optional; the defaults are the design's:
 *
 * @param locationSd sd of the normal prior of every location or regression coefficient
 *     ({@code kappabar_j, gamma, pi0_j, pi, lambda}, the {@code a} component and off-diagonal
 *     components of Gamma's intercept row, and every demographic row of Gamma); mean 0 (10)
 * @param logScaleMean prior mean of the log-scale components of Gamma's intercept row
 *     ({@code log sigma, log L_kk}) (-1)
 * @param logScaleSd their prior sd (1)
 * @param varianceShape shape of the inverse-gamma prior of {@code tau^2, sigma_xi^2,
 *     sigma_p^2} (2)
 * @param varianceScale its scale (0.5)
 * @param vPsiExtraDf {@code V_psi ~ Inv-Wishart(nu0, S0)} with {@code nu0 = Kpsi +
 *     v_psi_extra_df} (3)
 * @param vPsiScale {@code S0 = v_psi_scale * nu0 * I} (0.1)
 * @param priceNoiseScale the scale of {@code sigma_p^2}'s inverse-gamma prior alone: null (not
 *     set) follows {@code variance_scale}; a number; or {@link #AUTO}, the residual variance of a
 *     first-pass regression of log price on products and cost shifters ({@link
 *     aislecast.core.estimate.FirstPass}), i.e. where the data put the price noise (README,
 *     "Priors that pull")
 */
public record PriorsConfig(
    @JsonProperty("location_sd") double locationSd,
    @JsonProperty("log_scale_mean") double logScaleMean,
    @JsonProperty("log_scale_sd") double logScaleSd,
    @JsonProperty("variance_shape") double varianceShape,
    @JsonProperty("variance_scale") double varianceScale,
    @JsonProperty("v_psi_extra_df") double vPsiExtraDf,
    @JsonProperty("v_psi_scale") double vPsiScale,
    @JsonProperty("price_noise_scale") String priceNoiseScale) {

  /** {@code price_noise_scale: auto}. */
  public static final String AUTO = "auto";

  public PriorsConfig {
    positive(locationSd, "priors.location_sd");
    if (!Double.isFinite(logScaleMean)) {
      throw new ConfigException("priors.log_scale_mean: must be a finite number");
    }
    positive(logScaleSd, "priors.log_scale_sd");
    positive(varianceShape, "priors.variance_shape");
    positive(varianceScale, "priors.variance_scale");
    // Inv-Wishart needs nu0 > Kpsi - 1; nu0 = Kpsi + extra, so extra > -1 keeps it proper
    if (!(vPsiExtraDf > -1 && Double.isFinite(vPsiExtraDf))) {
      throw new ConfigException("priors.v_psi_extra_df: " + vPsiExtraDf + " must be > -1");
    }
    positive(vPsiScale, "priors.v_psi_scale");
    if (priceNoiseScale != null && !priceNoiseScale.equals(AUTO)) {
      double v;
      try {
        v = Double.parseDouble(priceNoiseScale);
      } catch (NumberFormatException e) {
        throw new ConfigException("priors.price_noise_scale: '" + priceNoiseScale
            + "' must be a number > 0 or 'auto'");
      }
      positive(v, "priors.price_noise_scale");
    }
  }

  /** Whether {@code sigma_p^2}'s prior scale comes from the data ({@code auto}). */
  public boolean priceNoiseAuto() {
    return AUTO.equals(priceNoiseScale);
  }

  @JsonCreator
  static PriorsConfig fromYaml(
      @JsonProperty("location_sd") Double locationSd,
      @JsonProperty("log_scale_mean") Double logScaleMean,
      @JsonProperty("log_scale_sd") Double logScaleSd,
      @JsonProperty("variance_shape") Double varianceShape,
      @JsonProperty("variance_scale") Double varianceScale,
      @JsonProperty("v_psi_extra_df") Double vPsiExtraDf,
      @JsonProperty("v_psi_scale") Double vPsiScale,
      @JsonProperty("price_noise_scale") com.fasterxml.jackson.databind.JsonNode priceNoise) {
    String pn = null;
    if (priceNoise != null && !priceNoise.isNull()) {
      if (!priceNoise.isNumber() && !priceNoise.isTextual()) {
        throw new ConfigException("priors.price_noise_scale: must be a number > 0 or 'auto'");
      }
      pn = priceNoise.asText();
    }
    return new PriorsConfig(or(locationSd, 10.0), or(logScaleMean, -1.0), or(logScaleSd, 1.0),
        or(varianceShape, 2.0), or(varianceScale, 0.5), or(vPsiExtraDf, 3.0),
        or(vPsiScale, 0.1), pn);
  }

  public static PriorsConfig defaults() {
    return fromYaml(null, null, null, null, null, null, null, null);
  }

  /**
   * The model's priors for {@code kd} rows of Gamma and {@code kx} product attributes, with
   * {@code price_noise_scale} not {@code auto}.
   */
  public Priors toPriors(int kd, int kx) {
    return toPriors(kd, kx, Double.NaN);
  }

  /**
   * The model's priors; {@code firstPassPriceVariance} is the value {@code price_noise_scale:
   * auto} stands for (ignored otherwise).
   *
   * @throws IllegalArgumentException when the setting is {@code auto} and the value is not a
   *     finite number > 0
   */
  public Priors toPriors(int kd, int kx, double firstPassPriceVariance) {
    int kpsi = Heterogeneity.dim(kx);
    double locVar = locationSd * locationSd;
    double[] mean = new double[kd * kpsi];
    double[] var = new double[kd * kpsi];
    java.util.Arrays.fill(var, locVar);
    for (int k = 1; k <= 1 + kx; k++) {
      mean[k] = logScaleMean;
      var[k] = logScaleSd * logScaleSd;
    }
    double nu0 = kpsi + vPsiExtraDf;
    double[] s0 = new double[kpsi * kpsi];
    for (int i = 0; i < kpsi; i++) {
      s0[i * kpsi + i] = vPsiScale * nu0;
    }
    Normal location = new Normal(0.0, locVar);
    InvGamma variance = new InvGamma(varianceShape, varianceScale);
    InvGamma priceNoise = new InvGamma(varianceShape, priceNoiseScale(firstPassPriceVariance));
    return new Priors(kd, kpsi, mean, var, new InvWishart(nu0, s0, kpsi), location, variance,
        location, location, location, location, variance, priceNoise);
  }

  /** The scale of {@code sigma_p^2}'s prior this setting stands for. */
  public double priceNoiseScale(double firstPassPriceVariance) {
    if (priceNoiseScale == null) {
      return varianceScale;
    }
    if (!priceNoiseAuto()) {
      return Double.parseDouble(priceNoiseScale);
    }
    if (!(firstPassPriceVariance > 0) || !Double.isFinite(firstPassPriceVariance)) {
      throw new IllegalArgumentException("price_noise_scale: auto needs the first-pass price"
          + " variance, got " + firstPassPriceVariance);
    }
    return firstPassPriceVariance;
  }

  private static double or(Double v, double d) {
    return v == null ? d : v;
  }

  private static void positive(double v, String key) {
    if (!(v > 0) || !Double.isFinite(v)) {
      throw new ConfigException(key + ": " + v + " must be a finite number > 0");
    }
  }
}
