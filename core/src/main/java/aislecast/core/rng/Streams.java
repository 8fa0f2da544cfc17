package aislecast.core.rng;

/**
 * Derives stream keys from (run seed, chain, store, sweep, purpose) by chained mixing, so every
 * random stream in a run is a pure function of its coordinates (DESIGN section 5).
 */
public final class Streams {
  private Streams() {}

  /** Key from a seed and any number of integer coordinates. */
  public static long key(long seed, long... coordinates) {
    long h = SplitMix64.mix(seed ^ 0x5DEECE66DL);
    for (long c : coordinates) {
      h = SplitMix64.mix(h + 0x9E3779B97F4A7C15L * (c + 1));
    }
    return h;
  }

  /** Key from a seed and a byte string (e.g. a store id in UTF-8). */
  public static long key(long seed, byte[] bytes) {
    long h = SplitMix64.mix(seed ^ 0x2545F4914F6CDD1DL);
    for (byte b : bytes) {
      h = SplitMix64.mix(h + (b & 0xFF) + 1);
    }
    return h;
  }

  /** A generator for the given coordinates. */
  public static SplitMix64 stream(long seed, long... coordinates) {
    return new SplitMix64(key(seed, coordinates));
  }
}
