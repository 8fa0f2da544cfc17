package aislecast.bench;

import aislecast.core.demand.ShareKernel;
import aislecast.core.estimate.Sweeps;
import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.mcmc.StoreTarget;
import aislecast.core.model.ProductCatalog;
import aislecast.core.model.StoreAssembler;
import aislecast.core.model.StoreData;
import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimulatedData;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;

/**
 * The estimation sweep's two hot spots for one store of the simulated scenario (the issue's
 * must-show shape by default: 26 weeks, 40 products, 3 attributes, R = 50 shopper draws): one
 * evaluation of the local HMC target with its gradient ({@link StoreTarget}), as every leapfrog
 * step makes, and one market's share Jacobian, as the ridge move's re-inversion makes.
 *
 * <p>{@code java -cp bench/target/benchmarks.jar org.openjdk.jmh.Main LocalTargetBench -f 1 -wi 3
 * -i 5}
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MICROSECONDS)
public class LocalTargetBench {
  @Param("26")
  public int weeks;

  @Param("40")
  public int products;

  @Param("50")
  public int shoppers;

  private StoreTarget target;
  private double[] pos;
  private double[] grad;
  private double[] probs;
  private double[] alpha;
  private double[] jacobian;

  @Setup
  public void setUp() {
    SimulatedData sim = DemandSimulator.simulate(
        SimSettings.demo().withSizes(2, weeks, products, 3, 3, shoppers));
    String[] owners = new String[sim.products()];
    for (int p = 0; p < owners.length; p++) {
      owners[p] = sim.ownerNames[sim.productOwner[p]];
    }
    ProductCatalog catalog = new ProductCatalog(sim.productIds, owners, sim.attributeNames,
        sim.xRaw);
    List<StoreAssembler.Row> rows = new ArrayList<>();
    Map<String, Double> delta = new HashMap<>();
    for (int i = 0; i < sim.rows; i++) {
      if (sim.rowStore[i] != 0) {
        continue; // the first store only
      }
      String week = sim.weekDates[sim.rowWeek[i]];
      rows.add(new StoreAssembler.Row(week, sim.rowProduct[i], sim.units[i], sim.price[i],
          new double[] {sim.onDisplay[i]}, new double[] {Math.log(sim.unitCost[i])}));
      delta.put(week + "/" + sim.rowProduct[i], sim.delta[i]);
    }
    Map<String, Long> size = new HashMap<>();
    for (String w : sim.weekDates) {
      size.put(w, (long) sim.shoppers[0]);
    }
    StoreData d = StoreAssembler.assemble(sim.storeIds[0], 0, new double[] {1.0, 0.0},
        sim.draws[0], shoppers, rows, size, 1, 1);
    SimSettings st = sim.settings;
    Dims dims = new Dims(2, st.psiDim(), sim.products(), 1, 1);
    Globals truth = new Globals(dims, sim.gamma, sim.vPsi, sim.kappabar, st.tau() * st.tau(),
        new double[] {st.displayEffect()}, st.sigmaXi() * st.sigmaXi(), sim.pi0,
        new double[] {st.costPassThrough()}, st.lambda(), st.sigmaP() * st.sigmaP());
    target = new StoreTarget(d, catalog.x(), catalog.attributes());
    target.condition(Sweeps.localParams(new Globals[] {truth})[0]);
    // the simulation's own locals, in the target's coordinates
    int kp = dims.kpsi();
    int np = d.products.length;
    double[] nat = new double[kp + np + d.rows()];
    System.arraycopy(sim.psi, 0, nat, 0, kp);
    for (int l = 0; l < np; l++) {
      nat[kp + l] = sim.kappa[d.products[l]]; // store 0's row of the store x product table
    }
    for (int t = 0; t < d.markets(); t++) {
      for (int r = d.rowStart[t]; r < d.rowStart[t + 1]; r++) {
        nat[kp + np + r] = delta.get(d.weeks[t] + "/" + d.product[r]);
      }
    }
    pos = new double[nat.length];
    target.fromNatural(nat, pos);
    grad = new double[pos.length];
    // one full market's shopper probabilities (equal utilities: only the cost matters here)
    probs = new double[shoppers * products];
    java.util.Arrays.fill(probs, 1.0 / (products + 1));
    alpha = new double[shoppers];
    java.util.Arrays.fill(alpha, 1.5);
    jacobian = new double[products * products];
  }

  @Benchmark
  public double gradient() {
    return target.logDensityAndGradient(pos, grad);
  }

  @Benchmark
  public double[] shareJacobian() {
    ShareKernel.jacobianPrice(shoppers, products, probs, alpha, jacobian);
    return jacobian;
  }
}
