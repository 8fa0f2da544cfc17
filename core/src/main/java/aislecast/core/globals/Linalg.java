package aislecast.core.globals;

import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.decomposition.TriangularSolver_DDRM;
import org.ejml.dense.row.decomposition.chol.CholeskyDecompositionInner_DDRM;

/** Small dense helpers on row-major flat arrays, delegating factorisations to EJML. */
final class Linalg {
  private Linalg() {}

  /**
   * Lower Cholesky factor of a symmetric positive definite n x n matrix.
   *
   * @param a not modified (only its lower triangle is read)
   * @return a new n x n row-major lower-triangular array, or {@code null} if {@code a} is not
   *     positive definite (EJML reports failure through its return value)
   */
  static double[] choleskyLower(double[] a, int n) {
    if (n == 0) {
      return new double[0];
    }
    DMatrixRMaj m = new DMatrixRMaj(n, n);
    System.arraycopy(a, 0, m.data, 0, n * n);
    CholeskyDecompositionInner_DDRM chol = new CholeskyDecompositionInner_DDRM(true);
    if (!chol.decompose(m)) {
      return null;
    }
    double[] l = chol.getT(null).data;
    for (double v : l) {
      if (!Double.isFinite(v)) {
        return null;
      }
    }
    return l;
  }

  /** Solves L x = b in place (L lower triangular n x n, not modified). */
  static void solveLower(double[] l, double[] b, int n) {
    if (n > 0) {
      TriangularSolver_DDRM.solveL(l, b, n);
    }
  }

  /** Solves L' x = b in place (L lower triangular n x n, not modified). */
  static void solveLowerTransposed(double[] l, double[] b, int n) {
    if (n > 0) {
      TriangularSolver_DDRM.solveTranL(l, b, n);
    }
  }

  /** Inverse of a symmetric positive definite matrix from its lower Cholesky factor; new array. */
  static double[] inverseFromCholesky(double[] l, int n) {
    double[] inv = new double[n * n];
    double[] col = new double[n];
    for (int k = 0; k < n; k++) {
      java.util.Arrays.fill(col, 0.0);
      col[k] = 1.0;
      solveLower(l, col, n);
      solveLowerTransposed(l, col, n);
      for (int i = 0; i < n; i++) {
        inv[i * n + k] = col[i];
      }
    }
    symmetrise(inv, n);
    return inv;
  }

  /** Replaces a with (a + a')/2 in place, so later Cholesky calls see exact symmetry. */
  static void symmetrise(double[] a, int n) {
    for (int i = 0; i < n; i++) {
      for (int k = 0; k < i; k++) {
        double v = 0.5 * (a[i * n + k] + a[k * n + i]);
        a[i * n + k] = v;
        a[k * n + i] = v;
      }
    }
  }

  /**
   * Throws unless {@code a} is finite and symmetric to a relative 1e-10.
   *
   * @param what name used in the message
   */
  static void requireSymmetric(double[] a, int n, String what) {
    double scale = 0.0;
    for (int i = 0; i < n * n; i++) {
      if (!Double.isFinite(a[i])) {
        throw new IllegalArgumentException(what + " has a non-finite element at " + i);
      }
      scale = Math.max(scale, Math.abs(a[i]));
    }
    for (int i = 0; i < n; i++) {
      for (int k = 0; k < i; k++) {
        if (Math.abs(a[i * n + k] - a[k * n + i]) > 1e-10 * scale) {
          throw new IllegalArgumentException(
              what + " is not symmetric at (" + i + "," + k + "): " + a[i * n + k] + " vs "
                  + a[k * n + i]);
        }
      }
    }
  }

  /** Index of element (i, k), k <= i, in packed lower-triangular row-by-row storage. */
  static int packed(int i, int k) {
    return i * (i + 1) / 2 + k;
  }

  /** Throws unless every element is finite. */
  static void requireFinite(double[] a, String what) {
    for (int i = 0; i < a.length; i++) {
      if (!Double.isFinite(a[i])) {
        throw new IllegalArgumentException(what + "[" + i + "] is not finite: " + a[i]);
      }
    }
  }

  static void requireLength(double[] a, int n, String what) {
    if (a == null || a.length != n) {
      throw new IllegalArgumentException(
          what + " must have length " + n + ", got " + (a == null ? "null" : a.length));
    }
  }
}
