package aislecast.core.equilibrium;

/**
 * What one price solve did. Failures are reported here, never thrown.
 *
 * @param converged the first-order conditions of every re-set product hold to the tolerance
 * @param iterations markup updates made (0 when nothing was re-set)
 * @param residual {@code max_j |FOC_j| / s_j} over re-set products at the returned prices, where
 *     {@code FOC_j = Lambda_jj (p_j - c_j) - [(H o Gamma)'(p - c)]_j - s_j} (see {@link
 *     EquilibriumSolver}); NaN when nothing was re-set
 * @param absResidual {@code max_j |FOC_j|} over re-set products, in share units; NaN when nothing
 *     was re-set
 * @param failure why the solve failed, or null
 */
public record SolveInfo(
    boolean converged, int iterations, double residual, double absResidual, String failure) {

  /** Nothing to solve: every price was given. */
  public static SolveInfo held() {
    return new SolveInfo(true, 0, Double.NaN, Double.NaN, null);
  }
}
