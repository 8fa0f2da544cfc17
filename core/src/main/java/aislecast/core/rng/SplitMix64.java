package aislecast.core.rng;

import org.apache.commons.math3.random.AbstractRandomGenerator;

/**
 * Counter-based generator: output n is {@code mix(key + n * GOLDEN)}, with the SplitMix64
 * finaliser (Steele, Lea and Flood 2014, "Fast splittable pseudorandom number generators").
 * A stream is fully determined by its key, so a retried task that rebuilds the stream from the
 * same key draws exactly the same numbers.
 *
 * <p>Extends commons-math3's {@link AbstractRandomGenerator} so it plugs into its distributions;
 * {@link #nextGaussian} there is the polar method on top of {@link #nextDouble}.
 */
public final class SplitMix64 extends AbstractRandomGenerator {
  private static final long GOLDEN = 0x9E3779B97F4A7C15L;
  private long state;

  public SplitMix64(long key) {
    this.state = key;
  }

  /** The SplitMix64 finaliser: a bijective 64-bit mix. */
  public static long mix(long z) {
    z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
    z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
    return z ^ (z >>> 31);
  }

  @Override
  public long nextLong() {
    state += GOLDEN;
    return mix(state);
  }

  @Override
  public int nextInt() {
    return (int) (nextLong() >>> 32);
  }

  /** Uniform in [0, 1) with 53 random bits. */
  @Override
  public double nextDouble() {
    return (nextLong() >>> 11) * 0x1.0p-53;
  }

  @Override
  public void setSeed(long seed) {
    clear();
    this.state = seed;
  }
}
