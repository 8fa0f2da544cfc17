package aislecast.core.scenario;

import aislecast.core.equilibrium.EquilibriumSettings;

/**
 * Settings of {@link PriceRecommender}.
 *
 * @param maxMovePercent guard-rail: no price moves more than this percent from its current value
 *     (default 10)
 * @param response how the other products respond to the portfolio's prices (default nash)
 * @param objectiveQuantile NaN to maximise the expected portfolio margin over draws (default);
 *     else maximise this quantile of it (e.g. 0.1 for a cautious recommendation)
 * @param costFloorQuantile prices never go below this quantile over draws of the product's
 *     marginal cost (default 1: the largest cost of any draw)
 * @param minStepPercent the search stops when its step falls below this percent of the current
 *     price (default 0.01)
 * @param maxEvaluations most objective evaluations (each one market per draw; default 500)
 * @param equilibrium convergence settings of the competitors' equilibrium
 */
public record RecommendSettings(double maxMovePercent, Response response,
    double objectiveQuantile, double costFloorQuantile, double minStepPercent, int maxEvaluations,
    EquilibriumSettings equilibrium) {

  public RecommendSettings {
    if (!(maxMovePercent > 0 && maxMovePercent < 100)) {
      throw new IllegalArgumentException("maxMovePercent must be in (0, 100), got " + maxMovePercent);
    }
    if (response == null || equilibrium == null) {
      throw new IllegalArgumentException("response and equilibrium settings are required");
    }
    if (!Double.isNaN(objectiveQuantile) && !(objectiveQuantile >= 0 && objectiveQuantile <= 1)) {
      throw new IllegalArgumentException("objectiveQuantile must be NaN or in [0, 1]");
    }
    if (!(costFloorQuantile >= 0 && costFloorQuantile <= 1)) {
      throw new IllegalArgumentException("costFloorQuantile must be in [0, 1]");
    }
    if (!(minStepPercent > 0 && minStepPercent < maxMovePercent)) {
      throw new IllegalArgumentException("minStepPercent must be in (0, maxMovePercent)");
    }
    if (maxEvaluations < 1) {
      throw new IllegalArgumentException("maxEvaluations must be >= 1");
    }
  }

  public static RecommendSettings defaults() {
    return new RecommendSettings(10, Response.NASH, Double.NaN, 1.0, 0.01, 500,
        EquilibriumSettings.defaults());
  }

  public RecommendSettings with(double maxMove, Response r, double quantile) {
    return new RecommendSettings(maxMove, r, quantile, costFloorQuantile, minStepPercent,
        maxEvaluations, equilibrium);
  }

  public RecommendSettings withSearch(double minStep, int maxEval) {
    return new RecommendSettings(maxMovePercent, response, objectiveQuantile, costFloorQuantile,
        minStep, maxEval, equilibrium);
  }
}
