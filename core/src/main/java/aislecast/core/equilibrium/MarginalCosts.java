package aislecast.core.equilibrium;

import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.factory.LinearSolverFactory_DDRM;
import org.ejml.interfaces.linsol.LinearSolverDense;

/**
 * Marginal costs implied by the multi-product Bertrand first-order conditions at observed prices
 * (DESIGN section 6): {@code mc = p - Omega^-1 s} with {@code Omega_jk = -ds_k/dp_j} when j and k
 * have the same owner, else 0. With the notation of {@link EquilibriumSolver}, {@code Omega = H o
 * (Lambda - Gamma)}, and {@code Omega (p - c) = s} is exactly its {@code FOC = 0}, so costs
 * recovered at an equilibrium reproduce the costs it was solved with.
 *
 * <p>The linear system is solved with EJML's LU decomposition. Non-positive costs are flagged and
 * counted, never clipped. One instance per thread (owns its matrices).
 */
public final class MarginalCosts {
  /** Largest accepted relative residual {@code ||Omega m - s|| / ||s||} of the solve. */
  private static final double MAX_SOLVE_RESIDUAL = 1e-8;

  /**
   * @param solved the system could be solved (Omega not singular, result finite)
   * @param nonPositive number of products whose recovered cost is <= 0
   * @param failure why it could not be solved, or null
   */
  public record Info(boolean solved, int nonPositive, String failure) {}

  private final DMatrixRMaj omega;
  private final DMatrixRMaj work;
  private final DMatrixRMaj rhs;
  private final DMatrixRMaj solution;
  private final LinearSolverDense<DMatrixRMaj> solver;
  private final double[] shares;
  private final double[] probs;

  public MarginalCosts(int maxShoppers, int maxProducts) {
    omega = new DMatrixRMaj(maxProducts, maxProducts);
    work = new DMatrixRMaj(maxProducts, maxProducts);
    rhs = new DMatrixRMaj(maxProducts, 1);
    solution = new DMatrixRMaj(maxProducts, 1);
    solver = LinearSolverFactory_DDRM.lu(maxProducts);
    shares = new double[maxProducts];
    probs = new double[maxShoppers * maxProducts];
  }

  /**
   * Recovers costs at prices {@code price}.
   *
   * @param m the market, not modified
   * @param price observed prices, length J, not modified
   * @param costOut length J, modified (NaN when not solved)
   * @param nonPositiveOut length J, modified: which costs are <= 0; may be null
   */
  public Info recover(MarketModel m, double[] price, double[] costOut, boolean[] nonPositiveOut) {
    final int r = m.shoppers();
    final int j = m.products();
    final int[] firm = m.firmIndex();
    final double[] alpha = m.alpha();
    m.shares(price, shares, probs);
    omega.reshape(j, j);
    double[] o = omega.data;
    java.util.Arrays.fill(o, 0, j * j, 0.0);
    for (int i = 0; i < r; i++) {
      int row = i * j;
      double a = alpha[i];
      for (int p = 0; p < j; p++) {
        double ap = a * probs[row + p];
        int op = p * j;
        o[op + p] += ap;
        int fp = firm[p];
        for (int k = 0; k < j; k++) {
          if (firm[k] == fp) {
            o[op + k] -= ap * probs[row + k];
          }
        }
      }
    }
    double invR = 1.0 / r;
    for (int q = 0; q < j * j; q++) {
      o[q] *= invR;
    }
    rhs.reshape(j, 1);
    solution.reshape(j, 1);
    for (int p = 0; p < j; p++) {
      rhs.data[p] = shares[p];
    }
    String failure = null;
    work.setTo(omega); // the solver may overwrite its input; omega is kept for the residual
    if (!solver.setA(work)) {
      failure = "first-order-condition matrix could not be decomposed";
    } else {
      solver.solve(rhs, solution);
      // a singular Omega shows up as a solution that does not solve the system
      double worst = 0.0;
      double scale = 0.0;
      for (int p = 0; p < j; p++) {
        double acc = -shares[p];
        for (int k = 0; k < j; k++) {
          acc += o[p * j + k] * solution.data[k];
        }
        worst = Math.max(worst, Math.abs(acc));
        scale = Math.max(scale, shares[p]);
      }
      if (!(worst <= MAX_SOLVE_RESIDUAL * scale)) {
        failure = "first-order-condition matrix is singular (solve residual " + worst + ")";
      }
    }
    int nonPositive = 0;
    for (int p = 0; p < j; p++) {
      double c = failure == null ? price[p] - solution.data[p] : Double.NaN;
      if (failure == null && !Double.isFinite(c)) {
        failure = "recovered cost of product " + p + " is not finite";
      }
      costOut[p] = c;
      boolean bad = c <= 0;
      if (bad) {
        nonPositive++;
      }
      if (nonPositiveOut != null) {
        nonPositiveOut[p] = bad;
      }
    }
    if (failure != null) {
      java.util.Arrays.fill(costOut, 0, j, Double.NaN);
      if (nonPositiveOut != null) {
        java.util.Arrays.fill(nonPositiveOut, 0, j, false);
      }
      return new Info(false, 0, failure);
    }
    return new Info(true, nonPositive, null);
  }
}
