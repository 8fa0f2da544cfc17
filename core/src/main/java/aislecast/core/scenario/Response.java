package aislecast.core.scenario;

/** How the products a scenario does not change directly respond (DESIGN section 6). */
public enum Response {
  /** Every other product keeps its base price. */
  HOLD,
  /**
   * Every product not changed directly re-sets its price to the multi-product Bertrand-Nash
   * equilibrium given the changed ones and the costs recovered at base.
   */
  NASH
}
