package aislecast.core.demand;

import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.factory.LinearSolverFactory_DDRM;
import org.ejml.interfaces.linsol.LinearSolverDense;

/**
 * Inverts observed shares to mean utilities: finds {@code delta} with {@code s(delta) = s_obs}
 * for fixed shopper parts.
 *
 * <p>Newton's method on {@code f(delta) = log s(delta) - log s_obs}, whose Jacobian is
 * {@code D_jk / s_j} (D from {@link ShareKernel#jacobianDelta}), with step halving when the
 * residual grows; if a Newton step cannot be solved it falls back to the contraction
 * {@code delta <- delta + log s_obs - log s(delta)} (Berry, Levinsohn and Pakes 1995), which
 * always converges for this model but linearly. Every call reports iterations and the residual.
 *
 * <p>One instance per thread; buffers are sized once.
 */
public final class ShareInversion {
  /** Outcome of one inversion. */
  public record Result(boolean converged, int iterations, double maxAbsLogResidual) {}

  private final FactoredShares kernel;
  private final double[] s;
  private final double[] probs;
  private final double[] jac;
  private final double[] trial;
  private final DMatrixRMaj jm;
  private final DMatrixRMaj rhs;
  private final DMatrixRMaj step;
  private final int maxProducts;

  public ShareInversion(int maxShoppers, int maxProducts) {
    this.maxProducts = maxProducts;
    this.kernel = new FactoredShares(maxShoppers, maxProducts);
    this.s = new double[maxProducts];
    this.probs = new double[maxShoppers * maxProducts];
    this.jac = new double[maxProducts * maxProducts];
    this.trial = new double[maxProducts];
    this.jm = new DMatrixRMaj(maxProducts, maxProducts);
    this.rhs = new DMatrixRMaj(maxProducts, 1);
    this.step = new DMatrixRMaj(maxProducts, 1);
  }

  /**
   * @param v R x J shopper parts, not modified
   * @param target observed inside shares, length J, each in (0, 1), sum below 1; not modified
   * @param delta starting point on entry, solution on exit (modified)
   * @param tol convergence threshold on {@code max_j |log s_j - log target_j|}
   */
  public Result invert(int r, int j, double[] v, double[] target, double[] delta, double tol,
      int maxIterations) {
    LinearSolverDense<DMatrixRMaj> solver = begin(r, j, v);
    double res = residual(j, target, delta, true);
    int it = 0;
    while (res > tol && it < maxIterations) {
      it++;
      ShareKernel.jacobianDelta(r, j, probs, jac);
      for (int a = 0; a < j; a++) {
        for (int b = 0; b < j; b++) {
          jm.set(a, b, jac[a * j + b] / s[a]);
        }
        rhs.set(a, 0, Math.log(s[a]) - Math.log(target[a]));
      }
      boolean newton = solver.setA(jm);
      if (newton) {
        solver.solve(rhs, step);
      }
      double t = 1.0;
      double next = Double.POSITIVE_INFINITY;
      for (int halving = 0; halving < 30; halving++) {
        for (int p = 0; p < j; p++) {
          double dstep = newton ? step.get(p, 0) : rhs.get(p, 0);
          trial[p] = delta[p] - t * dstep;
        }
        next = residual(j, target, trial, false);
        if (next < res || !newton) {
          break;
        }
        t *= 0.5;
      }
      if (!(next < res) && newton) {
        // Newton failed to improve: one plain contraction step instead.
        for (int p = 0; p < j; p++) {
          trial[p] = delta[p] - rhs.get(p, 0);
        }
      }
      System.arraycopy(trial, 0, delta, 0, j);
      res = residual(j, target, delta, true);
    }
    return new Result(res <= tol, it, res);
  }

  /**
   * The same root by the chord method: Newton steps that all use one fixed Jacobian {@code d0}
   * of the shares (J x J, row-major, as from {@link ShareKernel#jacobianDelta}), taken where the
   * shares equal {@code target}; for a nearby {@code v} this converges linearly at a rate set by
   * how much the Jacobian moved, and each step costs one share evaluation instead of a new
   * Jacobian and factorisation (Kelley 2003, Solving Nonlinear Equations with Newton's Method,
   * section 1.8). Stops without converging when a step does not lower the residual; the caller
   * then falls back to {@link #invert}.
   */
  public Result invertChord(int r, int j, double[] v, double[] target, double[] delta,
      double[] d0, double tol, int maxIterations) {
    LinearSolverDense<DMatrixRMaj> solver = begin(r, j, v);
    double res = residual(j, target, delta, true);
    for (int a = 0; a < j; a++) {
      for (int b = 0; b < j; b++) {
        jm.set(a, b, d0[a * j + b] / target[a]);
      }
    }
    if (!solver.setA(jm)) {
      return new Result(false, 0, res);
    }
    int it = 0;
    while (res > tol && it < maxIterations) {
      it++;
      for (int a = 0; a < j; a++) {
        rhs.set(a, 0, Math.log(s[a]) - Math.log(target[a]));
      }
      solver.solve(rhs, step);
      for (int p = 0; p < j; p++) {
        trial[p] = delta[p] - step.get(p, 0);
      }
      double next = residual(j, target, trial, false);
      if (!(next < res)) {
        return new Result(false, it, res);
      }
      System.arraycopy(trial, 0, delta, 0, j);
      res = next;
    }
    return new Result(res <= tol, it, res);
  }

  /** Checks the size, prepares the kernel for {@code v} and sizes the buffers; a fresh solver. */
  private LinearSolverDense<DMatrixRMaj> begin(int r, int j, double[] v) {
    if (j > maxProducts) {
      throw new IllegalArgumentException("market has " + j + " products, buffers hold " + maxProducts);
    }
    kernel.prepare(r, j, v);
    jm.reshape(j, j);
    rhs.reshape(j, 1);
    step.reshape(j, 1);
    return LinearSolverFactory_DDRM.lu(j);
  }

  private double residual(int j, double[] target, double[] d, boolean keepProbs) {
    kernel.shares(d, s, probs);
    double worst = 0.0;
    for (int p = 0; p < j; p++) {
      double e = Math.abs(Math.log(s[p]) - Math.log(target[p]));
      if (!(e <= worst)) {
        worst = e; // NaN propagates as "not converged"
      }
    }
    return worst;
  }
}
