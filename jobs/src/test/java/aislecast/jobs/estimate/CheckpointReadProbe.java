package aislecast.jobs.estimate;

import aislecast.core.estimate.StoreBlock;
import java.util.Locale;
import org.apache.hadoop.fs.Path;
import org.apache.spark.HashPartitioner;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.storage.StorageLevel;
import scala.Tuple2;

/**
 * Manual probe (not a test): the time to read one checkpoint's store blocks back into the
 * sampler's layout, the way before (Spark's {@code objectFile}, split by file size, then a
 * shuffle by store index) against {@link StateCheckpoints#readBlocks(Path, int)} (whole files,
 * no shuffle when the partition count is the one saved), alternated, each read persisted and
 * counted as {@link SweepLoop} does.
 *
 * <p>Usage: {@code CheckpointReadProbe <sweep-N folder of a checkpoint> <partitions> [reps]}, on
 * the jobs test class path with Spark's {@code --add-opens} flags; prints one line per read.
 */
public final class CheckpointReadProbe {
  private CheckpointReadProbe() {}

  public static void main(String[] args) {
    Path dir = new Path(args[0]);
    int partitions = Integer.parseInt(args[1]);
    int reps = args.length > 2 ? Integer.parseInt(args[2]) : 3;
    SparkSession spark = SparkSession.builder().master("local[2]").appName("checkpoint-read")
        .getOrCreate();
    JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
    StateCheckpoints checkpoints = new StateCheckpoints(jsc, dir.getParent().toString());
    for (int rep = 0; rep < reps; rep++) {
      for (String how : new String[] {"objectFile + shuffle", "whole files"}) {
        long t0 = System.nanoTime();
        JavaRDD<StoreBlock> read = how.startsWith("whole")
            ? checkpoints.readBlocks(dir, partitions)
            : jsc.<StoreBlock>objectFile(new Path(dir, StateCheckpoints.BLOCKS_DIR).toString())
                .mapToPair(b -> new Tuple2<>(b.data.storeIndex, b))
                .partitionBy(new HashPartitioner(partitions)).values();
        read.persist(StorageLevel.MEMORY_AND_DISK());
        long blocks = read.count();
        System.out.printf(Locale.ROOT, "%-21s rep %d: %d store blocks in %d partitions, %.2f s%n",
            how, rep, blocks, read.getNumPartitions(), (System.nanoTime() - t0) * 1e-9);
        read.unpersist(true);
      }
    }
    spark.stop();
  }
}
