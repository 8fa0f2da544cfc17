package aislecast.bench;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.draws.ShopperDraws;
import aislecast.core.equilibrium.EquilibriumSolver;
import aislecast.core.equilibrium.MarketModel;
import aislecast.core.equilibrium.SolveInfo;
import aislecast.core.scenario.BaseDraw;
import aislecast.core.scenario.BaseMarket;
import aislecast.core.scenario.PriceChange;
import aislecast.core.scenario.Response;
import aislecast.core.scenario.Scenario;
import aislecast.core.scenario.ScenarioEvaluator;
import aislecast.core.scenario.ScenarioOutcome;
import aislecast.core.scenario.ScenarioPlan;
import aislecast.core.equilibrium.EquilibriumSettings;
import java.util.List;
import java.util.Set;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.factory.LinearSolverFactory_DDRM;
import org.ejml.interfaces.linsol.LinearSolverDense;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;

/**
 * Equilibrium solves for one store market: R shoppers, J products of F owners, Kx attributes with
 * random tastes. The scenario is a 5% cut on product 0; {@code nash} re-sets the other J - 1
 * prices starting from the base prices, {@code hold} evaluates the market at the new prices. Base
 * prices are an equilibrium of costs drawn once (so the base is what estimation would give).
 * One call is one solve; single-threaded throughput is solves per core-second.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.Throughput)
@OutputTimeUnit(TimeUnit.SECONDS)
public class EquilibriumBench {
  @Param("200")
  public int shoppers;

  @Param("24")
  public int products;

  @Param("4")
  public int owners;

  @Param("3")
  public int attributes;

  private MarketModel model;
  private EquilibriumSolver solver;
  private double[] cost;
  private double[] basePrice;
  private double[] scenarioPrice;
  private double[] price;
  private boolean[] free;
  private NaiveNewton newton;
  private ScenarioEvaluator evaluator;
  private BaseDraw baseDraw;
  private ScenarioPlan holdPlan;
  private ScenarioPlan nashPlan;
  private BaseMarket market;
  private double[] psi;
  private double[] delta;

  @Setup
  public void setUp() {
    int r = shoppers;
    int j = products;
    int kx = attributes;
    SplittableRandom g = new SplittableRandom(2025L);
    psi = new double[Heterogeneity.dim(kx)];
    psi[0] = Math.log(1.2);
    psi[1] = Math.log(0.3);
    for (int k = 0; k < kx; k++) {
      psi[2 + k] = Math.log(0.5);
    }
    for (int q = 2 + kx; q < psi.length; q++) {
      psi[q] = 0.15;
    }
    double[] nu = ShopperDraws.generate(7L, "bench-store", r, 1 + kx);
    double[] x = new double[j * kx];
    for (int q = 0; q < x.length; q++) {
      x[q] = g.nextGaussian();
    }
    delta = new double[j];
    int[] firm = new int[j];
    cost = new double[j];
    String[] ids = new String[j];
    String[] ownerNames = new String[j];
    for (int p = 0; p < j; p++) {
      delta[p] = -2.0 + g.nextDouble();
      firm[p] = p % owners;
      cost[p] = 0.7 + 0.8 * g.nextDouble();
      ids[p] = String.format("P%02d", p);
      ownerNames[p] = "owner" + firm[p];
    }
    model = new MarketModel(r, j);
    model.load(psi, kx, nu, r, x, j, delta, firm);
    solver = new EquilibriumSolver(r, j);
    free = new boolean[j];
    java.util.Arrays.fill(free, true);
    basePrice = new double[j];
    java.util.Arrays.fill(basePrice, 2.5);
    SolveInfo base = solver.solve(model, cost, free, basePrice);
    if (!base.converged()) {
      throw new IllegalStateException("base equilibrium failed: " + base);
    }
    free[0] = false;
    scenarioPrice = basePrice.clone();
    scenarioPrice[0] *= 0.95;
    price = new double[j];
    newton = new NaiveNewton(r, j);

    market = new BaseMarket("bench-store", ids, ownerNames, kx, x, basePrice, 5000, nu, r, null,
        Set.of("owner0"));
    evaluator = new ScenarioEvaluator(r, j, EquilibriumSettings.defaults(), false);
    baseDraw = evaluator.base(market, psi, delta);
    List<PriceChange> cut = List.of(PriceChange.percent(ids[0], -5));
    holdPlan = ScenarioPlan.of(market, new Scenario("cut", cut, List.of(), List.of(), Response.HOLD));
    nashPlan = ScenarioPlan.of(market, new Scenario("cut", cut, List.of(), List.of(), Response.NASH));
  }

  /** Iterations and residual of one nash solve of the benchmark's scenario (for the table). */
  public SolveInfo nashInfo() {
    System.arraycopy(scenarioPrice, 0, price, 0, price.length);
    return solver.solve(model, cost, free, price);
  }

  /** Newton iterations of the baseline on the same scenario (for the table). */
  public int newtonIterations() {
    System.arraycopy(scenarioPrice, 0, price, 0, price.length);
    return newton.solve(model, cost, free, price);
  }

  /** hold: the market at the scenario prices (shares and shopper probabilities). */
  @Benchmark
  public double hold() {
    System.arraycopy(scenarioPrice, 0, price, 0, price.length);
    return solver.evaluate(model, price);
  }

  /** nash: the zeta-markup fixed point from base prices, FOC residual checked per iterate. */
  @Benchmark
  public double nash() {
    System.arraycopy(scenarioPrice, 0, price, 0, price.length);
    SolveInfo info = solver.solve(model, cost, free, price);
    return info.residual() + price[1];
  }

  /** Baseline: Newton on the FOC with a forward-difference Jacobian (ShareKernel shares). */
  @Benchmark
  public double naiveNewton() {
    System.arraycopy(scenarioPrice, 0, price, 0, price.length);
    return newton.solve(model, cost, free, price) + price[1];
  }

  /** Per (store, draw): tastes, costs from the FOC at base, base outcome. */
  @Benchmark
  public BaseDraw scenarioBase() {
    return evaluator.base(market, psi, delta);
  }

  /** Per (store, draw, scenario), hold: load, evaluate, outcome arrays (no elasticities). */
  @Benchmark
  public ScenarioOutcome scenarioHold() {
    return evaluator.evaluate(baseDraw, holdPlan);
  }

  /** Per (store, draw, scenario), nash: load, solve, outcome arrays (no elasticities). */
  @Benchmark
  public ScenarioOutcome scenarioNash() {
    return evaluator.evaluate(baseDraw, nashPlan);
  }

  /**
   * The baseline solver: Newton's method on the first-order conditions {@code g_k(p) = s_k +
   * sum_{j in f(k)} (p_j - c_j) ds_j/dp_k} of the free products, each g from ShareKernel's shares
   * and price Jacobian, the Newton Jacobian by forward differences (one g per free product), solved
   * with EJML LU. Same stopping rule as the zeta solver: {@code max |g_k| / s_k <= 1e-10}.
   */
  static final class NaiveNewton {
    private final double[] v;
    private final double[] probs;
    private final double[] shares;
    private final double[] dsdp;
    private final double[] deltaBuf;
    private final double[] g;
    private final double[] g2;
    private final DMatrixRMaj jac;
    private final DMatrixRMaj rhs;
    private final DMatrixRMaj step;
    private final LinearSolverDense<DMatrixRMaj> lu;
    private final int[] idx;

    NaiveNewton(int r, int j) {
      v = new double[r * j];
      probs = new double[r * j];
      shares = new double[j];
      dsdp = new double[j * j];
      deltaBuf = new double[j];
      g = new double[j];
      g2 = new double[j];
      jac = new DMatrixRMaj(j, j);
      rhs = new DMatrixRMaj(j, 1);
      step = new DMatrixRMaj(j, 1);
      lu = LinearSolverFactory_DDRM.lu(j);
      idx = new int[j];
    }

    /** Returns Newton iterations, or -1 when not converged in 100. */
    int solve(MarketModel m, double[] cost, boolean[] free, double[] price) {
      int j = m.products();
      int n = 0;
      for (int p = 0; p < j; p++) {
        if (free[p]) {
          idx[n++] = p;
        }
      }
      jac.reshape(n, n);
      rhs.reshape(n, 1);
      step.reshape(n, 1);
      for (int it = 0; it < 100; it++) {
        double res = foc(m, cost, free, price, g);
        if (res <= 1e-10) {
          return it;
        }
        for (int b = 0; b < n; b++) {
          int k = idx[b];
          double h = 1e-7 * Math.max(1.0, Math.abs(price[k]));
          double keep = price[k];
          price[k] = keep + h;
          foc(m, cost, free, price, g2);
          price[k] = keep;
          for (int a = 0; a < n; a++) {
            jac.set(a, b, (g2[idx[a]] - g[idx[a]]) / h);
          }
        }
        for (int a = 0; a < n; a++) {
          rhs.set(a, 0, -g[idx[a]]);
        }
        if (!lu.setA(jac)) {
          return -1;
        }
        lu.solve(rhs, step);
        for (int a = 0; a < n; a++) {
          price[idx[a]] += step.get(a, 0);
        }
      }
      return -1;
    }

    /** FOC values of every product into out; returns max |g_k| / s_k over free products. */
    private double foc(MarketModel m, double[] cost, boolean[] free, double[] price,
        double[] out) {
      int r = m.shoppers();
      int j = m.products();
      m.shopperUtility(price, v);
      m.delta(deltaBuf);
      ShareKernel.shares(r, j, deltaBuf, v, shares, probs);
      ShareKernel.jacobianPrice(r, j, probs, m.alpha(), dsdp);
      double res = 0;
      for (int k = 0; k < j; k++) {
        double gk = shares[k];
        for (int q = 0; q < j; q++) {
          if (m.firm(q) == m.firm(k)) {
            gk += (price[q] - cost[q]) * dsdp[q * j + k];
          }
        }
        out[k] = gk;
        if (free[k]) {
          res = Math.max(res, Math.abs(gk) / shares[k]);
        }
      }
      return res;
    }
  }
}
