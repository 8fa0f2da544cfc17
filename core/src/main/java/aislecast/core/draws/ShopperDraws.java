package aislecast.core.draws;

import java.nio.charset.StandardCharsets;
import org.apache.commons.math3.distribution.NormalDistribution;
import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;
import org.apache.commons.math3.random.SobolSequenceGenerator;

/**
 * Standard-normal shopper draws for a store: quasi-random Sobol points (commons-math3) with a
 * random Cranley-Patterson shift, mapped through the normal inverse CDF.
 *
 * <p>The shift is a pure function of (run seed, store id), so every store gets its own
 * deterministic draws whatever machine or partition computes them. Points 0 .. R-1 are used: the
 * shift moves the origin off the corner like any other point, and the first 2^m points of the
 * sequence form a net, which a skip would break.
 */
public final class ShopperDraws {
  private static final NormalDistribution STD_NORMAL = new NormalDistribution(null, 0.0, 1.0);

  private ShopperDraws() {}

  /**
   * @param seed run seed
   * @param storeId store key
   * @param shoppers number of draws R
   * @param dims 1 + Kx (price sensitivity, then one per attribute)
   * @return R x dims, row-major
   */
  public static double[] generate(long seed, String storeId, int shoppers, int dims) {
    if (shoppers <= 0 || dims <= 0 || dims > 1000) {
      throw new IllegalArgumentException("need shoppers > 0 and 0 < dims <= 1000");
    }
    SobolSequenceGenerator sobol = new SobolSequenceGenerator(dims);
    double[] shift = shift(seed, storeId, dims);
    double[] out = new double[shoppers * dims];
    for (int i = 0; i < shoppers; i++) {
      double[] u = sobol.nextVector();
      for (int d = 0; d < dims; d++) {
        double w = u[d] + shift[d];
        w -= Math.floor(w);
        // keep strictly inside (0, 1): the inverse CDF is infinite at the ends
        w = Math.min(Math.max(w, 0x1p-53), 1.0 - 0x1p-53);
        out[i * dims + d] = STD_NORMAL.inverseCumulativeProbability(w);
      }
    }
    return out;
  }

  /**
   * The Cranley-Patterson shift of a store: {@code dims} uniforms in [0, 1) from the stream keyed
   * by (seed, store id). Draw i is {@code Phi^-1(frac(sobol_i + shift))}.
   */
  public static double[] shift(long seed, String storeId, int dims) {
    SplitMix64 rng = new SplitMix64(Streams.key(seed, storeId.getBytes(StandardCharsets.UTF_8)));
    double[] shift = new double[dims];
    for (int d = 0; d < dims; d++) {
      shift[d] = rng.nextDouble();
    }
    return shift;
  }
}
