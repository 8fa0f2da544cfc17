package aislecast.jobs.scenario;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.diag.Diagnostics;
import aislecast.jobs.spark.SparkSessions;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * The scenario outputs' convergence check: per scenario and metric it sums the portfolio's
 * change over stores for each (chain, draw), orders draws within chains, and hands the chains to
 * {@link Diagnostics} (itself checked against ArviZ, DiagnosticsTest). Built here from a
 * store_totals-shaped table whose chains are known, in shuffled row order, with owner rows that
 * must not count.
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
      DataTypes.createStructField("change", DataTypes.DoubleType, false)));

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
          rows.add(RowFactory.create("apart", store, c, d, "portfolio", "revenue", a));
          rows.add(RowFactory.create("mixed", store, c, d, "portfolio", "revenue", m));
          // an owner row with a huge change: must not enter the portfolio's sum
          rows.add(RowFactory.create("mixed", store, c, d, "owner", "revenue", 1e6 * c));
        }
      }
    }
    Collections.shuffle(rows, new Random(4));
    Dataset<Row> totals = spark.createDataFrame(rows, SCHEMA);
    List<OutputConvergence.Check> checks = OutputConvergence.of(spark, totals);
    assertEquals(2, checks.size());
    OutputConvergence.Check a = checks.get(0);
    OutputConvergence.Check m = checks.get(1);
    assertEquals("apart", a.scenario());
    assertEquals("revenue", a.metric());
    assertEquals(chains, a.chains());
    assertEquals(draws, a.drawsPerChain());
    assertEquals(Diagnostics.rankRhat(apart), a.rhat(), 1e-12);
    assertEquals(Diagnostics.essBulk(apart), a.essBulk(), 1e-9);
    assertEquals(Diagnostics.rankRhat(mixed), m.rhat(), 1e-12);
    assertEquals(Diagnostics.essBulk(mixed), m.essBulk(), 1e-9);
    assertTrue(a.rhat() > 1.5, "chains 2 sd apart: " + a.rhat());
    assertTrue(m.rhat() < 1.05, "one distribution: " + m.rhat());

    // iid chains of 50 draws give R-hat around 1.01 by chance, so the limit here is 1.1
    List<String> notes = OutputConvergence.notes(checks, 1.1);
    assertEquals(1, notes.size(), notes.toString());
    assertEquals(String.format(java.util.Locale.ROOT, "scenario apart: the chains disagree about"
        + " the portfolio's revenue (R-hat %.3f) change over the posterior draws used (R-hat limit"
        + " 1.100), so those bands are not reliable yet", a.rhat()), notes.get(0));
    // two metrics of one scenario above the limit make one note naming both
    List<OutputConvergence.Check> two = List.of(
        new OutputConvergence.Check("s", "margin", 4, 50, 1.2, 20),
        new OutputConvergence.Check("s", "units", 4, 50, 1.3, 20),
        new OutputConvergence.Check("t", "units", 4, 50, 1.001, 900));
    assertEquals(List.of("scenario s: the chains disagree about the portfolio's margin (R-hat"
        + " 1.200), units (R-hat 1.300) change over the posterior draws used (R-hat limit 1.010),"
        + " so those bands are not reliable yet"), OutputConvergence.notes(two, 1.01));
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
        rows.add(RowFactory.create("uneven", "S1", c, d, "portfolio", "units", v));
      }
    }
    for (int c = 0; c < 2; c++) {
      for (int d = 0; d < 3; d++) {
        rows.add(RowFactory.create("short", "S1", c, d, "portfolio", "units", rng.nextGaussian()));
      }
    }
    List<OutputConvergence.Check> checks =
        OutputConvergence.of(spark, spark.createDataFrame(rows, SCHEMA));
    OutputConvergence.Check shortOne = checks.get(0);
    OutputConvergence.Check uneven = checks.get(1);
    assertEquals(6, uneven.drawsPerChain());
    assertEquals(Diagnostics.rankRhat(cut), uneven.rhat(), 1e-12);
    assertTrue(Double.isNaN(shortOne.rhat()), "3 draws per chain: no R-hat");
    List<String> notes = OutputConvergence.notes(checks, 10.0);
    assertEquals(List.of("the convergence of 1 of 2 scenario outputs cannot be checked: R-hat"
        + " needs at least 2 chains with 4 draws each among the posterior draws used (--draws)"),
        notes);
  }
}
