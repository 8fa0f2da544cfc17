/**
 * Global conjugate Gibbs steps of the estimation sampler (DESIGN sections 4 and 5).
 *
 * <p>Each sweep, every store updates its locals given the current {@link
 * aislecast.core.globals.Globals} and folds them into a {@link aislecast.core.globals.GlobalStats}
 * (mergeable sufficient statistics, built for Spark's {@code treeAggregate}); the driver then calls
 * {@link aislecast.core.globals.GlobalGibbs#draw}, a pure function of the merged statistics, the
 * {@link aislecast.core.globals.Priors} and an explicit random generator.
 *
 * <p>The distributions used by the conditionals ({@link aislecast.core.globals.Normal}, {@link
 * aislecast.core.globals.InvGamma}, {@link aislecast.core.globals.Gaussian}, {@link
 * aislecast.core.globals.InvWishart}) are small records that draw only from the generator passed
 * to {@code sample}.
 */
package aislecast.core.globals;
