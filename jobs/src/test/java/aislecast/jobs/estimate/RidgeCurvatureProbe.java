package aislecast.jobs.estimate;

import aislecast.core.estimate.DriverState;
import aislecast.core.estimate.FirstPass;
import aislecast.core.estimate.RidgeMove;
import aislecast.core.estimate.StoreBlock;
import aislecast.core.estimate.Sweeps;
import aislecast.core.globals.GlobalStats;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreSampler;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.validate.InputValidator;
import aislecast.jobs.validate.ValidatedInput;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import org.apache.commons.math3.linear.EigenDecomposition;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.MatrixUtils;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.sql.SparkSession;

/**
 * Manual probe (not a test): the width of the ridge move's target along each component of the
 * shift, at a checkpointed state. For each chain and component {@code i} it evaluates the move's
 * log acceptance ratio {@code r(c)} (the log of the collapsed target after the shift minus before,
 * the re-inversion's Jacobian included: the ratio {@code Sweeps.driverStep} uses) at the shifts
 * {@code c = +-h e_i} and {@code +-2h e_i} from the same state, and prints the conditional sd
 * {@code h / sqrt(-(r(h e_i) + r(-h e_i)))} (second central difference; the 2h pair shows whether
 * the target is close to quadratic there), next to the chain's ridge proposal sd.
 *
 * <p>With {@code full} it also takes the mixed second differences, so the whole Hessian {@code H}
 * of the target over the shift: it prints the target's sd along each component (the diagonal of
 * {@code H^-1}, correlations included), the proposal that shape would give, and how the chain's
 * own proposal compares, direction by direction (square roots of the eigenvalues of
 * {@code S' H S}, {@code S} its proposal factor: 1 is a step of the target's own sd).
 *
 * <p>Usage: {@code RidgeCurvatureProbe <input dir> <conf.yaml> <checkpoint>/sweep-N <seed> <h>
 * [full]},
 * on the jobs test class path with Spark's {@code --add-opens} flags (reads the input through the
 * validator, like {@code estimate}; the seed matters only for generated shopper draws).
 */
public final class RidgeCurvatureProbe {
  private RidgeCurvatureProbe() {}

  public static void main(String[] args) throws Exception {
    String input = args[0];
    RunConfig config = RunConfigLoader.load(Path.of(args[1]));
    org.apache.hadoop.fs.Path sweepDir = new org.apache.hadoop.fs.Path(args[2]);
    long seed = Long.parseLong(args[3]);
    double h = Double.parseDouble(args[4]);
    boolean full = args.length > 5 && args[5].equals("full");
    SparkSession spark = SparkSession.builder().master("local[2]").appName("ridge-curvature")
        .getOrCreate();
    JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
    Path staging = Files.createTempDirectory("ridge-curvature");
    ValidatedInput validated = InputValidator.run(spark, config, input, staging.toString());
    EstimationProblem problem = ProblemBuilder.build(jsc, validated, seed,
        config.sampler().shopperDraws());
    double firstPass = config.priors().priceNoiseAuto()
        ? FirstPass.priceResidualVariance(problem.stores(), problem.dims().products(),
            problem.dims().kc())
        : Double.NaN;
    Priors priors = config.priors().toPriors(problem.kd(), problem.kx(), firstPass);
    ChainRecord record = ProbeFiles.readRecord(
        Path.of(args[2], StateCheckpoints.DRIVER_FILE).toString());
    StateCheckpoints checkpoints = new StateCheckpoints(jsc, sweepDir.getParent().toString());
    List<StoreBlock> blocks = checkpoints.readBlocks(sweepDir).collect();
    spark.stop();

    double[] x = problem.catalog().x();
    int kx = problem.kx();
    int kpsi = problem.dims().kpsi();
    DriverState st = record.state;
    int chains = st.chains();
    StoreSampler[] samplers = new StoreSampler[blocks.size()];
    for (int s = 0; s < blocks.size(); s++) {
      samplers[s] = new StoreSampler(blocks.get(s).data, x, kx);
    }
    String[] names = EstimationProblem.psiNames(kx);
    System.out.printf(Locale.ROOT, "after sweep %d, %d stores, h = %s%n", st.nextSweep() - 1,
        blocks.size(), h);
    for (int c = 0; c < chains; c++) {
      // each store's natural locals as the next sweep starts: the accepted shift applied
      double[][] nat = new double[blocks.size()][];
      GlobalStats current = new GlobalStats(problem.dims());
      for (int s = 0; s < blocks.size(); s++) {
        StoreBlock b = blocks.get(s);
        nat[s] = samplers[s].natural(b.chains[c].position);
        double[] pending = st.pendingShift()[c];
        if (pending != null) {
          RidgeMove.apply(b.data, x, kx, nat[s], pending);
        }
        Sweeps.addStatistics(b.data, nat[s], kpsi, current);
      }
      final Globals g = st.globals()[c];
      final double base = RidgeMove.collapsedLogDensity(g, current, priors, false);
      double[] proposalSd = st.ridgeProposalSd(c);
      final double[][] natF = nat;
      java.util.function.ToDoubleFunction<double[]> ratio = shift -> {
        GlobalStats moved = new GlobalStats(problem.dims());
        double sales = 0;
        for (int s = 0; s < blocks.size(); s++) {
          double[] m = natF[s].clone();
          double logJac = RidgeMove.apply(blocks.get(s).data, x, kx, m, shift);
          sales += logJac + samplers[s].salesLogLikelihood(m)
              - samplers[s].salesLogLikelihood(natF[s]);
          Sweeps.addStatistics(blocks.get(s).data, m, kpsi, moved);
        }
        return sales + RidgeMove.collapsedLogDensity(g, moved, priors, false) - base;
      };
      System.out.printf(Locale.ROOT, "chain %d%n  %-12s %12s %12s %10s %10s %10s%n", c,
          "component", "r(+-h)", "r(+-2h)", "cond. sd", "from 2h", "proposal");
      double[][] hess = new double[kpsi][kpsi];
      for (int i = 0; i < kpsi; i++) {
        double[] r = new double[4];
        double[] steps = {h, -h, 2 * h, -2 * h};
        for (int q = 0; q < 4; q++) {
          double[] shift = new double[kpsi];
          shift[i] = steps[q];
          r[q] = ratio.applyAsDouble(shift);
        }
        hess[i][i] = -(r[0] + r[1]) / (h * h);
        double sd = h / Math.sqrt(-(r[0] + r[1]));
        double sd2 = 2 * h / Math.sqrt(-(r[2] + r[3]));
        System.out.printf(Locale.ROOT, "  %-12s %5.2f %6.2f %5.2f %6.2f %10.4f %10.4f %10.4f%n",
            names[i], r[0], r[1], r[2], r[3], sd, sd2, proposalSd[i]);
      }
      if (!full) {
        continue;
      }
      // off-diagonal second differences: -[r(+,+) - r(+,-) - r(-,+) + r(-,-)] / (4 h^2)
      for (int i = 0; i < kpsi; i++) {
        for (int j = i + 1; j < kpsi; j++) {
          double sum = 0;
          for (int si = -1; si <= 1; si += 2) {
            for (int sj = -1; sj <= 1; sj += 2) {
              double[] shift = new double[kpsi];
              shift[i] = si * h;
              shift[j] = sj * h;
              sum += si * sj * ratio.applyAsDouble(shift);
            }
          }
          hess[i][j] = -sum / (4 * h * h);
          hess[j][i] = hess[i][j];
        }
      }
      RealMatrix hm = MatrixUtils.createRealMatrix(hess);
      RealMatrix cov = new LUDecomposition(hm).getSolver().getInverse();
      double f = 2.38 / Math.sqrt(kpsi);
      StringBuilder sdLine = new StringBuilder("  target sd per component (from H^-1):");
      StringBuilder propLine = new StringBuilder("  a proposal of that shape (x 2.38/sqrt(k)):");
      for (int i = 0; i < kpsi; i++) {
        double v = Math.sqrt(Math.max(0, cov.getEntry(i, i)));
        sdLine.append(String.format(Locale.ROOT, " %.4f", v));
        propLine.append(String.format(Locale.ROOT, " %.4f", f * v));
      }
      System.out.println(sdLine);
      System.out.println(propLine);
      // how the chain's own proposal covers the target: eigenvalues of S' H S (S its proposal
      // factor, scale included); 1 means its proposal equals the target's spread in that direction
      double[] l = st.ridgeChol()[c];
      RealMatrix sm = MatrixUtils.createRealMatrix(kpsi, kpsi);
      for (int i = 0; i < kpsi; i++) {
        for (int q = 0; q < kpsi; q++) {
          sm.setEntry(i, q, st.ridgeScale()[c] * l[i * kpsi + q]);
        }
      }
      RealMatrix m = sm.transpose().multiply(hm).multiply(sm);
      m = m.add(m.transpose()).scalarMultiply(0.5);
      double[] ev = new EigenDecomposition(m).getRealEigenvalues();
      for (int i = 0; i < kpsi; i++) {
        ev[i] = Math.sqrt(Math.max(0, ev[i]));
      }
      java.util.Arrays.sort(ev);
      StringBuilder evLine =
          new StringBuilder("  its own proposal's step / the target's sd, by direction:");
      for (double e : ev) {
        evLine.append(String.format(Locale.ROOT, " %.2f", e));
      }
      System.out.println(evLine);
    }
  }
}
