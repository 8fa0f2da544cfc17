package aislecast.jobs.scenario;

import aislecast.core.sim.SimulatedData;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;

/**
 * A small "posterior" in the layout {@code aislecast estimate} writes (run.json with the seed and
 * {@code posterior/store_draws} in long format), built from the simulator's true psi: draw 0 of
 * chain 0 is the truth, the other draws are the truth plus seeded N(0, 0.05^2) noise, so the
 * scenario jobs can be tested without running estimation.
 */
final class TruthPosterior {
  /** A note the fake estimation run records in run.json; scenarios must pass it on. */
  static final String NOTE = "prior of sigma_p2: a note recorded by the estimation run";
  private TruthPosterior() {}

  static final StructType STORE_SCHEMA = DataTypes.createStructType(List.of(
      DataTypes.createStructField("store_id", DataTypes.StringType, false),
      DataTypes.createStructField("chain", DataTypes.IntegerType, false),
      DataTypes.createStructField("draw", DataTypes.IntegerType, false),
      DataTypes.createStructField("parameter", DataTypes.StringType, false),
      DataTypes.createStructField("value", DataTypes.DoubleType, false)));

  static void write(SparkSession spark, SimulatedData sim, Path dir, int chains,
      int drawsPerChain, long seed) throws Exception {
    write(spark, sim, dir, chains, drawsPerChain, seed, Double.NaN);
  }

  /** @param rhatLimit the run's {@code convergence.rhat_max_limit}, NaN to leave it out */
  static void write(SparkSession spark, SimulatedData sim, Path dir, int chains,
      int drawsPerChain, long seed, double rhatLimit) throws Exception {
    String[] names = sim.psiNames();
    int kpsi = names.length;
    Random rng = new Random(seed);
    List<Row> rows = new ArrayList<>();
    for (int s = 0; s < sim.stores(); s++) {
      for (int c = 0; c < chains; c++) {
        for (int d = 0; d < drawsPerChain; d++) {
          for (int k = 0; k < kpsi; k++) {
            double truth = sim.psi[s * kpsi + k];
            double v = c == 0 && d == 0 ? truth : truth + 0.05 * rng.nextGaussian();
            rows.add(RowFactory.create(sim.storeIds[s], c, d, names[k], v));
          }
        }
      }
    }
    Files.createDirectories(dir.resolve("posterior"));
    spark.createDataFrame(rows, STORE_SCHEMA).coalesce(1).write()
        .parquet(dir.resolve("posterior/store_draws").toString());
    Files.writeString(dir.resolve("run.json"), "{\"command\": \"estimate\", \"status\": \"ok\","
        + " \"seed\": " + seed + ", \"configuration\": {\"sampler\": {\"shopper_draws\": "
        + sim.settings.draws() + "}}, \"notes\": [\"" + NOTE + "\"]"
        + (Double.isNaN(rhatLimit) ? "" : ", \"convergence\": {\"rhat_max_limit\": " + rhatLimit
            + "}") + "}");
  }
}
