package aislecast.jobs.estimate;

import aislecast.core.estimate.StoreBlock;
import aislecast.jobs.config.RunFailure;
import java.io.IOException;
import java.io.InputStream;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.io.OutputStream;
import java.util.Optional;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.HashPartitioner;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
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

  /** The store blocks of a checkpoint, partitioned as the object file's splits fall. */
  JavaRDD<StoreBlock> readBlocks(Path sweepDir) {
    return jsc.objectFile(new Path(sweepDir, BLOCKS_DIR).toString());
  }

  /**
   * The store blocks of a checkpoint spread over {@code partitions} partitions by store index
   * (index modulo the count). An object file comes back split by file size, not by store: every
   * file of the save (one per partition, empty ones included) is at least one split and a file
   * above the block size is several, most of them empty. Read back as is, the partitions grew at
   * every checkpoint; a 100-store run was seen with 288 partitions after 35 checkpoints, 276 of
   * them empty and the other 12 holding 5 or 10 stores, so each sweep scheduled 288 tasks. The
   * shuffle costs one pass over the state per checkpoint. Draws do not depend on it (they do not
   * depend on the partitioning: {@code EstimateJobTest}).
   */
  JavaRDD<StoreBlock> readBlocks(Path sweepDir, int partitions) {
    return readBlocks(sweepDir)
        .mapToPair(b -> new Tuple2<>(b.data.storeIndex, b))
        .partitionBy(new HashPartitioner(partitions))
        .values();
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
