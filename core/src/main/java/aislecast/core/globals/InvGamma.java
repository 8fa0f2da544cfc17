package aislecast.core.globals;

import java.io.Serializable;
import org.apache.commons.math3.distribution.GammaDistribution;
import org.apache.commons.math3.random.RandomGenerator;

/**
 * Inverse-gamma distribution with density proportional to {@code x^(-shape-1) exp(-scale/x)}
 * (the parametrisation of Gelman et al., Bayesian Data Analysis, 3rd ed., appendix A).
 *
 * <p>Drawn as {@code 1/g} with {@code g ~ Gamma(shape, rate = scale)}, i.e. commons-math3's
 * {@link GammaDistribution} with scale parameter {@code 1/scale} (Marsaglia-Tsang for shape
 * &ge; 1).
 *
 * @param shape finite and &gt; 0
 * @param scale finite and &gt; 0
 */
public record InvGamma(double shape, double scale) implements Serializable {
  public InvGamma {
    if (!(shape > 0.0) || !Double.isFinite(shape)) {
      throw new IllegalArgumentException("inverse-gamma shape must be finite and > 0, got " + shape);
    }
    if (!(scale > 0.0) || !Double.isFinite(scale)) {
      throw new IllegalArgumentException("inverse-gamma scale must be finite and > 0, got " + scale);
    }
  }

  /** Mean {@code scale/(shape-1)}; +infinity when shape &le; 1. */
  public double mean() {
    return shape > 1.0 ? scale / (shape - 1.0) : Double.POSITIVE_INFINITY;
  }

  /** Variance {@code scale^2/((shape-1)^2 (shape-2))}; +infinity when shape &le; 2. */
  public double variance() {
    return shape > 2.0
        ? scale * scale / ((shape - 1.0) * (shape - 1.0) * (shape - 2.0))
        : Double.POSITIVE_INFINITY;
  }

  /** One draw, using only {@code rng}. */
  public double sample(RandomGenerator rng) {
    double g = new GammaDistribution(rng, shape, 1.0 / scale).sample();
    return 1.0 / g;
  }
}
