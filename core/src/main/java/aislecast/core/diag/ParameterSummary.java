package aislecast.core.diag;

/**
 * Posterior summary of one scalar parameter over all chains, as built by {@link
 * Diagnostics#summarize(double[][])}.
 *
 * @param mean mean of all draws pooled
 * @param sd standard deviation of all draws pooled (divisor n - 1)
 * @param q05 5% quantile of all draws pooled (linear interpolation, Hyndman-Fan type 7)
 * @param q50 median, same method
 * @param q95 95% quantile, same method
 * @param rhat rank-normalised split R-hat, {@link Diagnostics#rankRhat(double[][])}
 * @param essBulk bulk effective sample size, {@link Diagnostics#essBulk(double[][])}
 * @param essTail tail effective sample size, {@link Diagnostics#essTail(double[][])}
 * @param mcseMean Monte Carlo standard error of the mean, {@link Diagnostics#mcseMean(double[][])}
 */
public record ParameterSummary(
    double mean,
    double sd,
    double q05,
    double q50,
    double q95,
    double rhat,
    double essBulk,
    double essTail,
    double mcseMean) {}
