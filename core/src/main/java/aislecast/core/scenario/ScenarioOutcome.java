package aislecast.core.scenario;

import aislecast.core.equilibrium.SolveInfo;

/**
 * One scenario for one store and posterior draw: base and scenario markets (same owner order, so
 * owner and portfolio changes are differences of the two), and the solve report.
 *
 * @param scenarioName scenario name
 * @param storeId store
 * @param base the base market (owners as in {@code scenario})
 * @param scenario the scenario market at its prices
 * @param solve the response's report: {@link SolveInfo#held()} under {@code hold}; not converged
 *     when the equilibrium failed (its prices are then the last iterate)
 * @param nonPositiveCosts products of this draw whose first-order-condition cost is <= 0
 */
public record ScenarioOutcome(String scenarioName, String storeId, MarketOutcome base,
    MarketOutcome scenario, SolveInfo solve, int nonPositiveCosts) {

  public double portfolioMarginChange() {
    return scenario.portfolioMargin() - base.portfolioMargin();
  }

  public double portfolioRevenueChange() {
    return scenario.portfolioRevenue() - base.portfolioRevenue();
  }

  public double portfolioUnitsChange() {
    return scenario.portfolioUnits() - base.portfolioUnits();
  }
}
