package aislecast.core.globals;

import java.io.Serializable;
import org.apache.commons.math3.random.RandomGenerator;

/**
 * Univariate normal N(mean, var), used as a prior and as a scalar conditional.
 *
 * @param mean finite
 * @param var finite and &gt; 0
 */
public record Normal(double mean, double var) implements Serializable {
  public Normal {
    if (!Double.isFinite(mean)) {
      throw new IllegalArgumentException("normal mean must be finite, got " + mean);
    }
    if (!(var > 0.0) || !Double.isFinite(var)) {
      throw new IllegalArgumentException("normal variance must be finite and > 0, got " + var);
    }
  }

  /** One draw, using only {@code rng}. */
  public double sample(RandomGenerator rng) {
    return mean + Math.sqrt(var) * rng.nextGaussian();
  }
}
