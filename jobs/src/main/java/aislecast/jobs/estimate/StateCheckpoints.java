package aislecast.jobs.estimate;

import aislecast.core.estimate.StoreBlock;
import aislecast.jobs.config.RunFailure;
import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.io.ObjectStreamClass;
import java.io.OutputStream;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.hadoop.io.BytesWritable;
import org.apache.hadoop.io.NullWritable;
import org.apache.hadoop.mapred.SequenceFileInputFormat;
import org.apache.spark.HashPartitioner;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.api.java.function.Function;
import scala.Tuple2;

/**
 * Checkpoints of the sampler state in one folder: {@code sweep-<k>/blocks} (the store blocks as
 * a Spark object file) and {@code sweep-<k>/driver.bin} (the serialised {@link ChainRecord}),
 * written in that order, so a checkpoint is complete exactly when its {@code driver.bin} exists.
 * Writing a new checkpoint removes the older ones, like Spark MLlib's periodic checkpointer.
 *
 * <p>Spark's own {@code RDD.checkpoint()} files cannot be read back by a later application, so
 * the blocks are written with {@code saveAsObjectFile} and read with {@code objectFile}: the
 * reloaded RDD both cuts the lineage and is what {@code --resume} and {@code --warm-start} read.
 */
final class StateCheckpoints {
  static final String DRIVER_FILE = "driver.bin";
  static final String BLOCKS_DIR = "blocks";
  private static final String PREFIX = "sweep-";

  private final JavaSparkContext jsc;
  private final FileSystem fs;
  private final Path dir;

  StateCheckpoints(JavaSparkContext jsc, String dir) {
    this.jsc = jsc;
    this.dir = new Path(dir);
    try {
      this.fs = this.dir.getFileSystem(jsc.hadoopConfiguration());
    } catch (IOException e) {
      throw new RunFailure(RunFailure.OTHER, "cannot open checkpoint folder " + dir + ": "
          + e.getMessage(), e);
    }
  }

  String location() {
    return dir.toString();
  }

  /** Writes the state after sweep {@code record.nextSweep() - 1}; removes older checkpoints. */
  void save(JavaRDD<SweptStore> state, ChainRecord record) {
    Path target = new Path(dir, PREFIX + record.nextSweep());
    try {
      if (fs.exists(target)) {
        fs.delete(target, true);
      }
      state.map(s -> s.block).saveAsObjectFile(new Path(target, BLOCKS_DIR).toString());
      Path tmp = new Path(target, DRIVER_FILE + ".tmp");
      try (OutputStream os = fs.create(tmp, true);
          ObjectOutputStream oos = new ObjectOutputStream(os)) {
        oos.writeObject(record);
      }
      if (!fs.rename(tmp, new Path(target, DRIVER_FILE))) {
        throw new IOException("cannot rename " + tmp);
      }
      for (FileStatus st : list()) {
        if (!st.getPath().getName().equals(target.getName())) {
          fs.delete(st.getPath(), true);
        }
      }
    } catch (IOException e) {
      throw new RunFailure(RunFailure.OTHER, "cannot write checkpoint " + target + ": "
          + e.getMessage(), e);
    }
  }

  /** The newest complete checkpoint's sweep folder, if any. */
  Optional<Path> latest() {
    try {
      Path best = null;
      int bestSweep = -1;
      for (FileStatus st : list()) {
        String name = st.getPath().getName();
        int k;
        try {
          k = Integer.parseInt(name.substring(PREFIX.length()));
        } catch (NumberFormatException e) {
          continue;
        }
        if (k > bestSweep && fs.exists(new Path(st.getPath(), DRIVER_FILE))) {
          best = st.getPath();
          bestSweep = k;
        }
      }
      return Optional.ofNullable(best);
    } catch (IOException e) {
      throw new RunFailure(RunFailure.OTHER, "cannot list checkpoints in " + dir + ": "
          + e.getMessage(), e);
    }
  }

  ChainRecord readRecord(Path sweepDir) {
    Path f = new Path(sweepDir, DRIVER_FILE);
    try (InputStream is = fs.open(f); ObjectInputStream ois = new ObjectInputStream(is)) {
      return (ChainRecord) ois.readObject();
    } catch (IOException | ClassNotFoundException | ClassCastException e) {
      throw new RunFailure(RunFailure.BAD_INPUT, "cannot read checkpoint " + f
          + " (written by another version?): " + e.getMessage(), e);
    }
  }

  /**
   * The store blocks of a checkpoint, one partition per file of the save, as the state was
   * partitioned when saved. Read as Spark's {@code objectFile} writes them (a sequence file of
   * Java-serialised arrays of blocks), but never splitting a file: {@code objectFile} splits by
   * file size, and every extra split became a partition, mostly empty; a 100-store run was seen
   * with 288 partitions after 35 checkpoints, 276 of them empty, so each sweep scheduled 288 tasks.
   */
  JavaRDD<StoreBlock> readBlocks(Path sweepDir) {
    return jsc.hadoopFile(new Path(sweepDir, BLOCKS_DIR).toString(), WholeFiles.class,
            NullWritable.class, BytesWritable.class)
        .flatMap(kv -> blocksOf(kv._2()).iterator());
  }

  /**
   * The store blocks of a checkpoint spread over {@code partitions} partitions by store index
   * (index modulo the count), as {@link SweepLoop} keeps its state. A checkpoint it saved with
   * that count is already laid out so (one file per partition) and comes back without a shuffle;
   * any other count (a resume with another {@code sampler.partitions}) costs one shuffle of the
   * state. Draws do not depend on the partitioning ({@code EstimateJobTest}).
   */
  JavaRDD<StoreBlock> readBlocks(Path sweepDir, int partitions) {
    JavaRDD<StoreBlock> blocks = readBlocks(sweepDir);
    return blocks.getNumPartitions() == partitions ? blocks
        : byStoreIndex(blocks, b -> b.data.storeIndex, partitions);
  }

  /** {@code rdd} spread over {@code partitions} partitions by store index (modulo the count). */
  static <T> JavaRDD<T> byStoreIndex(JavaRDD<T> rdd, Function<T, Integer> storeIndex,
      int partitions) {
    return rdd.mapToPair(b -> new Tuple2<>(storeIndex.call(b), b))
        .partitionBy(new HashPartitioner(partitions))
        .values();
  }

  /** Deserialises one record of a Spark object file: a Java-serialised array of blocks. */
  private static List<StoreBlock> blocksOf(BytesWritable bytes)
      throws IOException, ClassNotFoundException {
    ClassLoader loader = Thread.currentThread().getContextClassLoader();
    try (ObjectInputStream in = new ObjectInputStream(
        new ByteArrayInputStream(bytes.getBytes(), 0, bytes.getLength())) {
          @Override
          protected Class<?> resolveClass(ObjectStreamClass desc)
              throws IOException, ClassNotFoundException {
            // the application's classes (a cluster's executors load them from the job's jar)
            return Class.forName(desc.getName(), false, loader);
          }
        }) {
      List<StoreBlock> out = new ArrayList<>();
      for (Object o : (Object[]) in.readObject()) {
        out.add((StoreBlock) o);
      }
      return out;
    }
  }

  /** Sequence files read whole: one split per file. */
  public static final class WholeFiles
      extends SequenceFileInputFormat<NullWritable, BytesWritable> {
    @Override
    protected boolean isSplitable(FileSystem fs, Path file) {
      return false;
    }
  }

  boolean exists() {
    try {
      return fs.exists(dir);
    } catch (IOException e) {
      return false;
    }
  }

  /** Removes the checkpoint folder and its parent work folder (after the run is published). */
  void deleteWithParent() {
    try {
      fs.delete(dir.getParent(), true);
    } catch (IOException e) {
      // a leftover hidden work folder is harmless; the run itself is published
    }
  }

  private FileStatus[] list() throws IOException {
    if (!fs.exists(dir)) {
      return new FileStatus[0];
    }
    return fs.listStatus(dir, p -> p.getName().startsWith(PREFIX));
  }
}
