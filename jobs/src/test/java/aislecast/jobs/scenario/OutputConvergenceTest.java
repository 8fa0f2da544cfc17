package aislecast.jobs.scenario;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.diag.Diagnostics;
import aislecast.jobs.spark.SparkSessions;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * The outputs' convergence check (scenarios and recommend): per output and metric it sums the
 * portfolio's change over stores for each (chain, draw), keeps only draws valid in every store,
 * orders draws within chains, and hands the chains to {@link Diagnostics} (itself checked against
 * ArviZ, DiagnosticsTest). Built here from store_totals- and recommendation_draws-shaped tables
 * whose chains are known, in shuffled row order, with owner rows that must not count.
 */
class OutputConvergenceTest {
  static SparkSession spark;

  @BeforeAll
  static void start() {
    spark = SparkSessions.open("local[1]", "output-convergence-test").spark();
  }

  @AfterAll
  static void stop() {
    spark.stop();
    SparkSession.clearActiveSession();
    SparkSession.clearDefaultSession();
  }

  private static final StructType SCHEMA = DataTypes.createStructType(List.of(
      DataTypes.createStructField("scenario", DataTypes.StringType, false),
      DataTypes.createStructField("store_id", DataTypes.StringType, false),
      DataTypes.createStructField("chain", DataTypes.IntegerType, false),
      DataTypes.createStructField("draw", DataTypes.IntegerType, false),
      DataTypes.createStructField("scope", DataTypes.StringType, false),
      DataTypes.createStructField("metric", DataTypes.StringType, false),
      DataTypes.createStructField("change", DataTypes.DoubleType, true),
      DataTypes.createStructField("converged", DataTypes.BooleanType, false),
      DataTypes.createStructField("cost_recovered", DataTypes.BooleanType, false)));

  /** A store_totals-shaped row, valid. */
  private static Row row(String scenario, String store, int c, int d, String scope,
      String metric, Double change) {
    return RowFactory.create(scenario, store, c, d, scope, metric, change, true, true);
  }

  /** Every draw 0..draws-1 of chains 0..chains-1, in chain and draw order. */
  private static PosteriorRun.Selection all(int chains, int... draws) {
    List<int[]> pairs = new ArrayList<>();
    for (int c = 0; c < chains; c++) {
      for (int d = 0; d < draws[c]; d++) {
        pairs.add(new int[] {c, d});
      }
    }
    return new PosteriorRun.Selection(pairs.stream().mapToInt(p -> p[0]).toArray(),
        pairs.stream().mapToInt(p -> p[1]).toArray(), pairs.size());
  }

  /** Per chain c, the sum over stores of {@code v[store][c][draw]} at the draws {@code kept[c]}. */
  private static double[][] summed(double[][][] v, int[][] kept) {
    double[][] out = new double[kept.length][kept[0].length];
    for (int c = 0; c < kept.length; c++) {
      for (int i = 0; i < kept[c].length; i++) {
        for (double[][] store : v) {
          out[c][i] += store[c][kept[c][i]];
        }
      }
    }
    return out;
  }

  private static List<OutputConvergence.Check> checks(List<Row> totals,
      PosteriorRun.Selection sel) {
    return OutputConvergence.of(spark,
        OutputConvergence.scenarioChanges(spark.createDataFrame(totals, SCHEMA)), sel);
  }

  @Test
  void sumsStoresPerDrawAndFlagsChainsThatDisagree() {
    Random rng = new Random(3);
    int chains = 4;
    int draws = 50;
    // "apart": chain c sits at 2c (R-hat far above 1); "mixed": one distribution for all chains
    double[][] apart = new double[chains][draws];
    double[][] mixed = new double[chains][draws];
    List<Row> rows = new ArrayList<>();
    for (int c = 0; c < chains; c++) {
      for (int d = 0; d < draws; d++) {
        for (String store : new String[] {"S1", "S2"}) {
          double a = 2.0 * c + rng.nextGaussian();
          double m = rng.nextGaussian();
          apart[c][d] += a;
          mixed[c][d] += m;
          rows.add(row("apart", store, c, d, "portfolio", "revenue", a));
          rows.add(row("mixed", store, c, d, "portfolio", "revenue", m));
          // an owner row with a huge change: must not enter the portfolio's sum
          rows.add(row("mixed", store, c, d, "owner", "revenue", 1e6 * c));
        }
      }
    }
    Collections.shuffle(rows, new Random(4));
    List<OutputConvergence.Check> checks = checks(rows, all(chains, draws, draws, draws, draws));
    assertEquals(2, checks.size());
    OutputConvergence.Check a = checks.get(0);
    OutputConvergence.Check m = checks.get(1);
    assertEquals("apart", a.scenario());
    assertEquals("revenue", a.metric());
    assertEquals(chains, a.chains());
    assertEquals(draws, a.drawsPerChain());
    assertEquals(0, a.drawsLeftOut());
    assertEquals(Diagnostics.rankRhat(apart), a.rhat(), 1e-12);
    assertEquals(Diagnostics.essBulk(apart), a.essBulk(), 1e-9);
    assertEquals(Diagnostics.rankRhat(mixed), m.rhat(), 1e-12);
    assertEquals(Diagnostics.essBulk(mixed), m.essBulk(), 1e-9);
    assertTrue(a.rhat() > 1.5, "chains 2 sd apart: " + a.rhat());
    assertTrue(m.rhat() < 1.05, "one distribution: " + m.rhat());

    // iid chains of 50 draws give R-hat around 1.01 by chance, so the limit here is 1.1
    List<String> notes = OutputConvergence.notes(checks, 1.1, chains * draws,
        OutputConvergence.Outputs.SCENARIOS);
    assertEquals(1, notes.size(), notes.toString());
    assertEquals(String.format(java.util.Locale.ROOT, "scenario apart: the chains disagree about"
        + " the portfolio's revenue (R-hat %.3f) change over the posterior draws used (R-hat limit"
        + " 1.100), so those bands are not reliable yet", a.rhat()), notes.get(0));
    // two metrics of one scenario above the limit make one note naming both
    List<OutputConvergence.Check> two = List.of(
        new OutputConvergence.Check("s", "margin", 4, 50, 0, 1.2, 20),
        new OutputConvergence.Check("s", "units", 4, 50, 0, 1.3, 20),
        new OutputConvergence.Check("t", "units", 4, 50, 0, 1.001, 900));
    assertEquals(List.of("scenario s: the chains disagree about the portfolio's margin (R-hat"
        + " 1.200), units (R-hat 1.300) change over the posterior draws used (R-hat limit 1.010),"
        + " so those bands are not reliable yet"), OutputConvergence.notes(two, 1.01, 200,
        OutputConvergence.Outputs.SCENARIOS));
    // recommend's notes name the output without the word scenario
    assertEquals(List.of("recommended prices: the chains disagree about the portfolio's margin"
        + " (R-hat 1.200) change over the posterior draws used (R-hat limit 1.010), so those bands"
        + " are not reliable yet"), OutputConvergence.notes(List.of(new OutputConvergence.Check(
        "recommended prices", "margin", 4, 50, 0, 1.2, 20)), 1.01, 200,
        OutputConvergence.Outputs.RECOMMEND));
    assertTrue(OutputConvergence.line(a).startsWith("apart, portfolio revenue change over all"
        + " stores: R-hat "), OutputConvergence.line(a));
  }

  @Test
  void unevenChainsAreCutToTheShortestAndTooFewDrawsSaySo() {
    List<Row> rows = new ArrayList<>();
    Random rng = new Random(5);
    double[][] cut = new double[2][6];
    for (int c = 0; c < 2; c++) {
      for (int d = 0; d < 6 + c; d++) {
        double v = rng.nextGaussian();
        if (d < 6) {
          cut[c][d] = v;
        }
        rows.add(row("uneven", "S1", c, d, "portfolio", "units", v));
      }
    }
    List<OutputConvergence.Check> checks = checks(rows, all(2, 6, 7));
    OutputConvergence.Check uneven = checks.get(0);
    assertEquals(6, uneven.drawsPerChain());
    assertEquals(0, uneven.drawsLeftOut(), "cut to equal length is not 'left out'");
    assertEquals(Diagnostics.rankRhat(cut), uneven.rhat(), 1e-12);

    List<Row> few = new ArrayList<>();
    for (int c = 0; c < 2; c++) {
      for (int d = 0; d < 3; d++) {
        few.add(row("short", "S1", c, d, "portfolio", "units", rng.nextGaussian()));
      }
    }
    List<OutputConvergence.Check> shortChecks = checks(few, all(2, 3, 3));
    assertTrue(Double.isNaN(shortChecks.get(0).rhat()), "3 draws per chain: no R-hat");
    assertEquals(List.of("the convergence of 1 of 1 scenario outputs cannot be checked: R-hat"
        + " needs at least 2 chains with 4 draws each among the posterior draws used (--draws)"),
        OutputConvergence.notes(shortChecks, 10.0, 6, OutputConvergence.Outputs.SCENARIOS));
  }

  /**
   * A draw counts only when every store has a valid value for it: here store S2 has no row for
   * (0, 2) (its share inversion failed), S1's equilibrium failed at (1, 4), S2's costs were not
   * recovered at (1, 5) (margin null), and no store has (1, 7). Those 4 are left out; chain 0
   * keeps draws 0, 1, 3, 4, 5, 6 and chain 1 keeps 0, 1, 2, 3, 6, so both are cut to 5. The
   * expected chains are assembled here by hand from the known per-store values.
   */
  @Test
  void drawsNotValidInEveryStoreAreLeftOutAndCounted() {
    Random rng = new Random(6);
    double[][][] v = new double[2][2][8]; // store, chain, draw
    List<Row> rows = new ArrayList<>();
    for (int st = 0; st < 2; st++) {
      for (int c = 0; c < 2; c++) {
        for (int d = 0; d < 7; d++) {
          v[st][c][d] = 10 * c + rng.nextGaussian();
          String store = "S" + (st + 1);
          if (st == 1 && c == 0 && d == 2) {
            continue;
          }
          boolean converged = !(st == 0 && c == 1 && d == 4);
          Double change = st == 1 && c == 1 && d == 5 ? null : v[st][c][d];
          rows.add(RowFactory.create("cut", store, c, d, "portfolio", "margin", change,
              converged, true));
        }
      }
    }
    Collections.shuffle(rows, new Random(7));
    double[][] want = summed(v, new int[][] {{0, 1, 3, 4, 5}, {0, 1, 2, 3, 6}});
    List<OutputConvergence.Check> checks = checks(rows, all(2, 7, 8));
    assertEquals(1, checks.size());
    OutputConvergence.Check k = checks.get(0);
    assertEquals(2, k.chains());
    assertEquals(5, k.drawsPerChain());
    assertEquals(4, k.drawsLeftOut());
    assertEquals(Diagnostics.rankRhat(want), k.rhat(), 1e-12);
    assertEquals(Diagnostics.essBulk(want), k.essBulk(), 1e-9);
    assertTrue(k.rhat() > 1.5, "chains 10 apart: " + k.rhat());
    assertEquals(4, k.toJson().get("draws_left_out"));
    assertTrue(OutputConvergence.line(k).endsWith("(2 chains x 5 draws; 4 draws left out, not"
        + " valid in every store)"), OutputConvergence.line(k));
    List<String> notes = OutputConvergence.notes(checks, 1.1, 15,
        OutputConvergence.Outputs.SCENARIOS);
    assertEquals("scenario cut: 4 of 15 posterior draws left out of the output convergence check"
        + " because they are not valid in every store (a share inversion, cost recovery or"
        + " equilibrium failed)", notes.get(0));
    assertEquals(2, notes.size(), notes.toString());

    // every draw invalid somewhere: nothing to check, said so rather than thrown
    List<Row> none = List.of(RowFactory.create("none", "S1", 0, 0, "portfolio", "margin", null,
        true, false));
    OutputConvergence.Check empty = checks(none, all(2, 4, 4)).get(0);
    assertEquals(0, empty.drawsPerChain());
    assertEquals(8, empty.drawsLeftOut());
    assertTrue(Double.isNaN(empty.rhat()) && Double.isNaN(empty.essBulk()));
  }

  /**
   * A chain whose draws are nearly all invalid somewhere (chain 2 keeps 2 of 6) is left out when
   * two chains with at least 4 valid draws remain; the other chains' check is computed as if it
   * had not been selected, and a note names the scenario. With only one good chain left nothing
   * is dropped and the check is, as before, not computable.
   */
  @Test
  void aChainWithTooFewValidDrawsIsLeftOutWhenTwoGoodChainsRemain() {
    Random rng = new Random(8);
    double[][] good = new double[2][6];
    List<Row> rows = new ArrayList<>();
    for (int c = 0; c < 3; c++) {
      for (int d = 0; d < 6; d++) {
        double x = rng.nextGaussian();
        if (c < 2) {
          good[c][d] = x;
        }
        rows.add(RowFactory.create("stuck", "S1", c, d, "portfolio", "units", x, c < 2 || d < 2,
            true));
      }
    }
    OutputConvergence.Check k = checks(rows, all(3, 6, 6, 6)).get(0);
    assertEquals(2, k.chains());
    assertEquals(1, k.chainsLeftOut());
    assertEquals(6, k.drawsPerChain());
    assertEquals(4, k.drawsLeftOut());
    assertEquals(Diagnostics.rankRhat(good), k.rhat(), 1e-12);
    assertEquals(Diagnostics.essBulk(good), k.essBulk(), 1e-9);
    assertEquals(1, k.toJson().get("chains_left_out"));
    assertTrue(OutputConvergence.line(k).endsWith("; 1 chain(s) left out)"),
        OutputConvergence.line(k));
    List<String> notes = OutputConvergence.notes(List.of(k), 10.0, 18,
        OutputConvergence.Outputs.SCENARIOS);
    assertTrue(notes.contains("scenario stuck: 1 chain(s) left out of the output convergence"
        + " check because fewer than 4 of their draws are valid in every store; such a chain sits"
        + " where the model's figures fail, so the chains cannot be said to agree"),
        notes.toString());

    // only chain 0 has enough: nothing is dropped, the check cannot be computed
    List<Row> one = new ArrayList<>();
    for (int c = 0; c < 2; c++) {
      for (int d = 0; d < 6; d++) {
        one.add(RowFactory.create("lonely", "S1", c, d, "portfolio", "units",
            rng.nextGaussian(), c == 0 || d < 2, true));
      }
    }
    OutputConvergence.Check lonely = checks(one, all(2, 6, 6)).get(0);
    assertEquals(0, lonely.chainsLeftOut());
    assertEquals(2, lonely.chains());
    assertTrue(Double.isNaN(lonely.rhat()));
  }

  /**
   * recommend's recommendation_draws (wide: one row per store and draw, nulls where a draw was
   * not used) becomes one output per metric under the given name.
   */
  @Test
  void recommendationDrawsBecomeOneOutputPerMetric() {
    StructType wide = DataTypes.createStructType(List.of(
        DataTypes.createStructField("store_id", DataTypes.StringType, false),
        DataTypes.createStructField("chain", DataTypes.IntegerType, false),
        DataTypes.createStructField("draw", DataTypes.IntegerType, false),
        DataTypes.createStructField("used", DataTypes.BooleanType, false),
        DataTypes.createStructField("margin_change", DataTypes.DoubleType, true),
        DataTypes.createStructField("revenue_change", DataTypes.DoubleType, true),
        DataTypes.createStructField("units_change", DataTypes.DoubleType, true)));
    Random rng = new Random(8);
    double[][][] v = new double[2][2][5]; // store, chain, draw
    List<Row> rows = new ArrayList<>();
    for (int c = 0; c < 2; c++) {
      for (int d = 0; d < 5; d++) {
        for (int st = 0; st < 2; st++) {
          v[st][c][d] = rng.nextGaussian();
          double x = v[st][c][d];
          // store S2 could not use draw 2 of chain 1
          rows.add(st == 1 && c == 1 && d == 2
              ? RowFactory.create("S2", c, d, false, null, null, null)
              : RowFactory.create("S" + (st + 1), c, d, true, 1.0 + x, 2.0 + x, x));
        }
      }
    }
    // chain 1 keeps draws 0, 1, 3, 4; chain 0 is cut to its first 4
    double[][] units = summed(v, new int[][] {{0, 1, 2, 3}, {0, 1, 3, 4}});
    List<OutputConvergence.Check> checks = OutputConvergence.of(spark,
        OutputConvergence.recommendationChanges(spark, spark.createDataFrame(rows, wide),
            "recommended prices"), all(2, 5, 5));
    assertEquals(List.of("margin", "revenue", "units"),
        checks.stream().map(OutputConvergence.Check::metric).toList());
    OutputConvergence.Check u = checks.get(2);
    assertEquals("recommended prices", u.scenario());
    assertEquals(1, u.drawsLeftOut());
    assertEquals(4, u.drawsPerChain());
    assertEquals(Diagnostics.rankRhat(units), u.rhat(), 1e-12);
    assertEquals(Diagnostics.essBulk(units), u.essBulk(), 1e-9);
  }
}
