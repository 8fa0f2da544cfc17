package aislecast.jobs.estimate;

import aislecast.core.diag.ParameterSummary;
import aislecast.core.estimate.StoreBlock;
import java.util.ArrayList;
import java.util.List;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.broadcast.Broadcast;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;

/**
 * The posterior tables of a run (DESIGN section 7), Parquet, long format, lower_snake_case:
 *
 * <ul>
 *   <li>{@code posterior/global_draws}: {@code chain int, draw int, parameter string, value
 *       double}: one row per kept draw of every global parameter ({@code draw} counts kept
 *       sweeps from 0 within each chain; names as {@code Globals.parameterNames});
 *   <li>{@code posterior/store_draws}: {@code store_id string, chain int, draw int, parameter
 *       string, value double}: the store's psi ({@code a, log_sigma, log_L11, ..., L21, ...});
 *   <li>{@code posterior/summary}: {@code parameter string, mean, sd, q05, q50, q95, rhat,
 *       ess_bulk, ess_tail, mcse_mean double}: one row per global parameter.
 * </ul>
 */
final class PosteriorWriter {
  static final String GLOBAL_DRAWS = "posterior/global_draws";
  static final String STORE_DRAWS = "posterior/store_draws";
  static final String SUMMARY = "posterior/summary";

  static final StructType GLOBAL_SCHEMA = DataTypes.createStructType(List.of(
      DataTypes.createStructField("chain", DataTypes.IntegerType, false),
      DataTypes.createStructField("draw", DataTypes.IntegerType, false),
      DataTypes.createStructField("parameter", DataTypes.StringType, false),
      DataTypes.createStructField("value", DataTypes.DoubleType, false)));

  static final StructType STORE_SCHEMA = DataTypes.createStructType(List.of(
      DataTypes.createStructField("store_id", DataTypes.StringType, false),
      DataTypes.createStructField("chain", DataTypes.IntegerType, false),
      DataTypes.createStructField("draw", DataTypes.IntegerType, false),
      DataTypes.createStructField("parameter", DataTypes.StringType, false),
      DataTypes.createStructField("value", DataTypes.DoubleType, false)));

  static final StructType SUMMARY_SCHEMA = DataTypes.createStructType(List.of(
      DataTypes.createStructField("parameter", DataTypes.StringType, false),
      DataTypes.createStructField("mean", DataTypes.DoubleType, true),
      DataTypes.createStructField("sd", DataTypes.DoubleType, true),
      DataTypes.createStructField("q05", DataTypes.DoubleType, true),
      DataTypes.createStructField("q50", DataTypes.DoubleType, true),
      DataTypes.createStructField("q95", DataTypes.DoubleType, true),
      DataTypes.createStructField("rhat", DataTypes.DoubleType, true),
      DataTypes.createStructField("ess_bulk", DataTypes.DoubleType, true),
      DataTypes.createStructField("ess_tail", DataTypes.DoubleType, true),
      DataTypes.createStructField("mcse_mean", DataTypes.DoubleType, true)));

  private PosteriorWriter() {}

  static void writeGlobalDraws(SparkSession spark, String runDir, double[][][] kept,
      String[] names) {
    JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
    Broadcast<double[][][]> bk = jsc.broadcast(kept);
    List<Integer> chains = new ArrayList<>();
    for (int c = 0; c < kept.length; c++) {
      chains.add(c);
    }
    JavaRDD<Row> rows = jsc.parallelize(chains, Math.max(1, chains.size())).flatMap(c -> {
      double[][] k = bk.value()[c];
      List<Row> out = new ArrayList<>(k.length * names.length);
      for (int d = 0; d < k.length; d++) {
        for (int p = 0; p < names.length; p++) {
          out.add(RowFactory.create(c, d, names[p], k[d][p]));
        }
      }
      return out.iterator();
    });
    spark.createDataFrame(rows, GLOBAL_SCHEMA).coalesce(1).write().mode(SaveMode.ErrorIfExists)
        .parquet(runDir + "/" + GLOBAL_DRAWS);
    bk.destroy();
  }

  static void writeStoreDraws(SparkSession spark, String runDir, JavaRDD<StoreBlock> blocks,
      String[] psiNames) {
    int kpsi = psiNames.length;
    JavaRDD<Row> rows = blocks.flatMap(b -> {
      List<Row> out = new ArrayList<>(b.chains.length * b.keptDraws * kpsi);
      for (int c = 0; c < b.chains.length; c++) {
        for (int d = 0; d < b.keptDraws; d++) {
          for (int k = 0; k < kpsi; k++) {
            out.add(RowFactory.create(b.data.storeId, c, d, psiNames[k],
                b.psiDraws[c][d * kpsi + k]));
          }
        }
      }
      return out.iterator();
    });
    spark.createDataFrame(rows, STORE_SCHEMA).write().mode(SaveMode.ErrorIfExists)
        .parquet(runDir + "/" + STORE_DRAWS);
  }

  static void writeSummary(SparkSession spark, String runDir, String[] names,
      ParameterSummary[] summaries) {
    List<Row> rows = new ArrayList<>();
    for (int p = 0; p < names.length; p++) {
      ParameterSummary s = summaries[p];
      rows.add(RowFactory.create(names[p], s.mean(), s.sd(), s.q05(), s.q50(), s.q95(), s.rhat(),
          s.essBulk(), s.essTail(), s.mcseMean()));
    }
    spark.createDataFrame(rows, SUMMARY_SCHEMA).coalesce(1).write().mode(SaveMode.ErrorIfExists)
        .parquet(runDir + "/" + SUMMARY);
  }
}
