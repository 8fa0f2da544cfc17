package aislecast.core.mcmc;

/**
 * Windowed warmup as in Stan's reference manual (section "HMC algorithm parameters"): a fast
 * initial window (step size only), then slow windows that double in length where the mass matrix
 * is estimated from the draws, then a terminal fast window. Pure functions of the iteration.
 */
public record WarmupSchedule(int warmup, int initBuffer, int termBuffer, int baseWindow) {

  /** Stan's defaults (75, 50, 25), shrunk proportionally when warmup is short. */
  public static WarmupSchedule of(int warmup) {
    if (warmup < 20) {
      return new WarmupSchedule(warmup, warmup, 0, 0);
    }
    if (warmup < 150) {
      int init = (int) (0.15 * warmup);
      int term = (int) (0.1 * warmup);
      return new WarmupSchedule(warmup, init, term, warmup - init - term);
    }
    return new WarmupSchedule(warmup, 75, 50, 25);
  }

  /** Whether draws at iteration {@code i} (0-based) feed the mass-matrix estimate. */
  public boolean inSlowWindow(int i) {
    return baseWindow > 0 && i >= initBuffer && i < warmup - termBuffer;
  }

  /** Whether iteration {@code i} closes a slow window (update the mass matrix, restart). */
  public boolean endsWindow(int i) {
    if (!inSlowWindow(i)) {
      return false;
    }
    int end = initBuffer;
    int size = baseWindow;
    int last = warmup - termBuffer;
    while (end < last) {
      int next = end + size;
      // the last slow window absorbs what would be too short a next window
      if (next + 2 * size > last) {
        next = last;
      }
      if (i == next - 1) {
        return true;
      }
      end = next;
      size *= 2;
    }
    return false;
  }
}
