package aislecast.jobs.scenario;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.spark.SparkSessions;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Random;
import java.util.concurrent.Callable;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * Benchmark (not a test): {@code aislecast scenarios} end to end on the demo data, every store x
 * N draws x every scenario of the given files, timed per phase and printed as a table.
 *
 * <p>Without {@code --posterior} it builds a stand-in posterior from the demo's truth.json: per
 * store, {@code draws} psi vectors = truth + N(0, 0.05^2) noise (seeded), in the layout estimation
 * writes; the work per (store, draw) is the same as with a real posterior.
 *
 * <pre>
 * java -cp jobs/target/aislecast.jar aislecast.jobs.scenario.ScenarioBenchmark \
 *   --input data-samples/chilled-drinks --scenario conf/scenarios --draws 400 --master local[2]
 * </pre>
 */
@Command(name = "scenario-benchmark", mixinStandardHelpOptions = true)
public final class ScenarioBenchmark implements Callable<Integer> {
  @Option(names = "--input", defaultValue = "data-samples/chilled-drinks") Path input;
  @Option(names = "--scenario", defaultValue = "conf/scenarios") List<Path> scenarios;
  @Option(names = "--posterior") String posterior;
  @Option(names = "--draws", defaultValue = "400") int draws;
  @Option(names = "--master", defaultValue = "local[2]") String master;
  @Option(names = "--work", defaultValue = "target/scenario-benchmark") Path work;
  @Option(names = "--skip-elasticities") boolean skipElasticities;

  public static void main(String[] args) {
    System.exit(new CommandLine(new ScenarioBenchmark()).execute(args));
  }

  @Override
  public Integer call() throws Exception {
    PrintWriter out = new PrintWriter(System.out, true);
    try (SparkSessions.Handle h = SparkSessions.open(master, "aislecast scenario benchmark")) {
      SparkSession spark = h.spark();
      String runId = "bench-" + System.currentTimeMillis();
      String post = posterior;
      if (post == null) {
        Path p = work.resolve(runId + "-posterior");
        truthPosterior(spark, input.resolve("truth.json"), p, draws, 20261201L);
        post = p.toString();
      }
      ScenarioFile.Resolved files = ScenarioFile.load(scenarios);
      files = new ScenarioFile.Resolved(files.baseWeeks(), draws, files.portfolio(),
          files.scenarios(), files.sources());
      ScenariosJob.Result r = ScenariosJob.run(spark, RunConfig.defaults(),
          new ScenariosJob.Options(input.toString(), work.toString(), runId, post, files,
              !skipElasticities), out);
      long evaluations = (long) r.stores() * r.draws() * r.scenarios();
      Map<String, Double> s = r.seconds();
      out.println();
      out.printf(Locale.ROOT, "scenarios benchmark: %d stores x %d draws x %d scenarios = %d"
          + " (store, draw, scenario) evaluations, master %s, %d product_detail rows%n",
          r.stores(), r.draws(), r.scenarios(), evaluations, master, r.detailRows());
      out.println("| phase | seconds |");
      out.println("|---|---:|");
      for (Map.Entry<String, Double> e : s.entrySet()) {
        out.printf(Locale.ROOT, "| %s | %.1f |%n", e.getKey(), e.getValue());
      }
      out.printf(Locale.ROOT, "| evaluations per second (evaluate phase) | %.0f |%n",
          evaluations / s.get("evaluate"));
      out.flush();
    }
    return 0;
  }

  /** Writes a stand-in posterior (see the class comment) from truth.json. */
  static void truthPosterior(SparkSession spark, Path truthJson, Path dir, int draws, long seed)
      throws Exception {
    JsonNode truth = new ObjectMapper().readTree(truthJson.toFile());
    List<String> names = new ArrayList<>();
    truth.get("psi_names").forEach(n -> names.add(n.asText()));
    Random rng = new Random(seed);
    List<Row> rows = new ArrayList<>();
    for (Iterator<JsonNode> it = truth.get("psi").elements(); it.hasNext(); ) {
      JsonNode store = it.next();
      for (int d = 0; d < draws; d++) {
        for (String n : names) {
          double v = store.get(n).asDouble() + (d == 0 ? 0 : 0.05 * rng.nextGaussian());
          rows.add(RowFactory.create(store.get("store_id").asText(), 0, d, n, v));
        }
      }
    }
    StructType schema = DataTypes.createStructType(List.of(
        DataTypes.createStructField("store_id", DataTypes.StringType, false),
        DataTypes.createStructField("chain", DataTypes.IntegerType, false),
        DataTypes.createStructField("draw", DataTypes.IntegerType, false),
        DataTypes.createStructField("parameter", DataTypes.StringType, false),
        DataTypes.createStructField("value", DataTypes.DoubleType, false)));
    Files.createDirectories(dir);
    spark.createDataFrame(rows, schema).coalesce(1).write()
        .parquet(dir.resolve(PosteriorRun.STORE_DRAWS).toString());
    Files.writeString(dir.resolve(PosteriorRun.RUN_JSON), "{\"command\": \"truth stand-in\","
        + " \"status\": \"ok\", \"seed\": " + seed + "}");
  }
}
