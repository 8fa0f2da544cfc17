package aislecast.jobs.scenario;

import static org.apache.spark.sql.functions.broadcast;
import static org.apache.spark.sql.functions.col;

import aislecast.jobs.config.RunFailure;
import aislecast.jobs.estimate.EstimationProblem;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.InputStream;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import scala.Tuple2;

/**
 * An estimation run as the scenario jobs read it: {@code run.json} (the run seed and the number
 * of generated shopper draws, so shopper draws are rebuilt exactly as estimation built them) and
 * {@code posterior/store_draws} (long format: store_id, chain, draw, parameter, value).
 */
public final class PosteriorRun {
  public static final String RUN_JSON = "run.json";
  public static final String STORE_DRAWS = "posterior/store_draws";

  private final String dir;
  private final long seed;
  private final Integer generatedShopperDraws;
  private final String status;
  private final List<String> notes;

  private final double rhatLimit;

  private PosteriorRun(String dir, long seed, Integer generatedShopperDraws, String status,
      List<String> notes, double rhatLimit) {
    this.rhatLimit = rhatLimit;
    this.dir = dir;
    this.seed = seed;
    this.generatedShopperDraws = generatedShopperDraws;
    this.status = status;
    this.notes = List.copyOf(notes);
  }

  /** Opens {@code dir}; exit 2 when it is not a finished estimation run. */
  public static PosteriorRun open(SparkSession spark, String dir) {
    Path json = new Path(dir, RUN_JSON);
    JsonNode root;
    try {
      FileSystem fs = json.getFileSystem(spark.sparkContext().hadoopConfiguration());
      if (!fs.exists(new Path(dir, STORE_DRAWS))) {
        throw new RunFailure(RunFailure.BAD_INPUT, "posterior " + dir + " has no " + STORE_DRAWS
            + "; pass the run folder of a finished 'aislecast estimate'");
      }
      if (!fs.exists(json)) {
        throw new RunFailure(RunFailure.BAD_INPUT, "posterior " + dir + " has no " + RUN_JSON);
      }
      try (InputStream in = fs.open(json)) {
        root = new ObjectMapper().readTree(in);
      }
    } catch (IOException e) {
      throw new RunFailure(RunFailure.BAD_INPUT, "cannot read posterior " + dir + ": "
          + e.getMessage(), e);
    }
    JsonNode seedNode = root.get("seed");
    if (seedNode == null || !seedNode.canConvertToLong()) {
      throw new RunFailure(RunFailure.BAD_INPUT, dir + "/" + RUN_JSON + " has no numeric seed");
    }
    JsonNode r = root.path("configuration").path("sampler").path("shopper_draws");
    List<String> notes = new ArrayList<>();
    root.path("notes").forEach(n -> notes.add(n.asText()));
    JsonNode limit = root.path("convergence").path("rhat_max_limit");
    return new PosteriorRun(dir, seedNode.asLong(), r.canConvertToInt() ? r.asInt() : null,
        root.path("status").asText(null), notes,
        limit.isNumber() ? limit.asDouble()
            : aislecast.jobs.config.SamplerConfig.DEFAULT_RHAT_MAX);
  }

  public String dir() {
    return dir;
  }

  /** The estimation run's seed (generated shopper draws depend on it). */
  public long seed() {
    return seed;
  }

  /** R of generated shopper draws in estimation, or null when run.json does not say. */
  public Integer generatedShopperDraws() {
    return generatedShopperDraws;
  }

  /** Notes the estimation run recorded in run.json (e.g. a variance prior pulling); may be empty. */
  public List<String> notes() {
    return notes;
  }

  /** The estimation run's R-hat limit ({@code convergence.rhat_max_limit}; 1.01 if absent). */
  public double rhatLimit() {
    return rhatLimit;
  }

  /** Status recorded in run.json (e.g. ok, not_converged), or null. */
  public String status() {
    return status;
  }

  /** Selected draws: (chain, draw) pairs in (chain, draw) order. */
  public record Selection(int[] chain, int[] draw, int available) {
    public int size() {
      return chain.length;
    }
  }

  /**
   * Picks {@code wanted} draws evenly spaced over all kept (chain, draw) pairs (0 = all): pair
   * number {@code floor(i N / wanted)} for i = 0 .. wanted - 1.
   */
  public Selection select(SparkSession spark, int wanted) {
    List<Row> pairs = new ArrayList<>(storeDraws(spark).select("chain", "draw").distinct()
        .collectAsList());
    if (pairs.isEmpty()) {
      throw new RunFailure(RunFailure.BAD_INPUT, dir + "/" + STORE_DRAWS + " is empty");
    }
    pairs.sort((a, b) -> a.getInt(0) != b.getInt(0) ? Integer.compare(a.getInt(0), b.getInt(0))
        : Integer.compare(a.getInt(1), b.getInt(1)));
    int n = pairs.size();
    int d = wanted <= 0 || wanted >= n ? n : wanted;
    int[] chain = new int[d];
    int[] draw = new int[d];
    for (int i = 0; i < d; i++) {
      Row r = pairs.get((int) ((long) i * n / d));
      chain[i] = r.getInt(0);
      draw[i] = r.getInt(1);
    }
    return new Selection(chain, draw, n);
  }

  /**
   * The selected psi draws per store, in selection order, as D x Kpsi arrays.
   *
   * @param kx attributes of the model, which fix psi's components and their order
   */
  public JavaPairRDD<String, double[][]> psiByStore(SparkSession spark, Selection sel, int kx,
      int partitions) {
    String[] names = EstimationProblem.psiNames(kx);
    Dataset<Row> draws = storeDraws(spark);
    List<String> found = new ArrayList<>();
    for (Row r : draws.select("parameter").distinct().collectAsList()) {
      found.add(r.getString(0));
    }
    if (!new java.util.HashSet<>(found).equals(new java.util.HashSet<>(Arrays.asList(names)))) {
      throw new RunFailure(RunFailure.BAD_INPUT, dir + "/" + STORE_DRAWS + " has parameters "
          + found + " but a model with " + kx + " attributes has " + Arrays.toString(names)
          + "; was it estimated on this input with the same configuration?");
    }
    List<Row> keys = new ArrayList<>();
    for (int i = 0; i < sel.size(); i++) {
      keys.add(RowFactory.create(sel.chain()[i], sel.draw()[i], i));
    }
    StructType keySchema = DataTypes.createStructType(List.of(
        DataTypes.createStructField("k_chain", DataTypes.IntegerType, false),
        DataTypes.createStructField("k_draw", DataTypes.IntegerType, false),
        DataTypes.createStructField("k_index", DataTypes.IntegerType, false)));
    Dataset<Row> selected = draws.join(broadcast(spark.createDataFrame(keys, keySchema)),
        col("chain").equalTo(col("k_chain")).and(col("draw").equalTo(col("k_draw"))))
        .select("store_id", "k_index", "parameter", "value");
    Map<String, Integer> index = new HashMap<>();
    for (int k = 0; k < names.length; k++) {
      index.put(names[k], k);
    }
    int d = sel.size();
    int kpsi = names.length;
    return selected.javaRDD()
        .mapToPair(r -> new Tuple2<>(r.getString(0), r))
        .groupByKey(partitions)
        .mapValues(rows -> {
          double[][] psi = new double[d][kpsi];
          boolean[][] seen = new boolean[d][kpsi];
          for (Row r : rows) {
            int i = r.getInt(1);
            int k = index.get(r.getString(2));
            psi[i][k] = r.getDouble(3);
            seen[i][k] = true;
          }
          for (int i = 0; i < d; i++) {
            for (int k = 0; k < kpsi; k++) {
              if (!seen[i][k]) {
                throw new RunFailure(RunFailure.BAD_INPUT, "posterior store_draws lack "
                    + names[k] + " for selected draw " + i);
              }
            }
          }
          return psi;
        });
  }

  /** Store ids that have posterior draws. */
  public List<String> stores(SparkSession spark) {
    List<String> out = new ArrayList<>();
    for (Row r : storeDraws(spark).select("store_id").distinct().collectAsList()) {
      out.add(r.getString(0));
    }
    return out;
  }

  private Dataset<Row> storeDraws(SparkSession spark) {
    return spark.read().parquet(dir + "/" + STORE_DRAWS);
  }
}
