package aislecast.jobs.io;

import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;

/**
 * Finds and reads the tables of an input folder. A table {@code t} is exactly one of
 * {@code t.csv} (CSV with a header; a file or a folder of CSV parts), {@code t.parquet} (file or
 * dataset folder) or {@code t/} (Parquet dataset folder). CSV is read with every column as text so
 * that malformed values are rejected row by row later instead of failing the read.
 *
 * <p>Works on any Hadoop file system Spark can see (local, HDFS, object stores).
 */
public final class InputTables {

  /** Storage format of one table entry. */
  public enum Format {
    CSV,
    PARQUET
  }

  /** One table as read: its raw rows, where it came from and in which format. */
  public record RawTable(String table, String location, Format format, Dataset<Row> rows) {}

  private InputTables() {}

  /**
   * Reads table {@code name} from {@code inputDir}, reporting it as {@code table} in messages.
   *
   * @return empty when the table is absent and not required
   * @throws InputException when a required table is absent, the entry is ambiguous, or it cannot
   *     be read
   */
  public static Optional<RawTable> read(
      SparkSession spark, String inputDir, String table, String name, boolean required) {
    Path dir = new Path(inputDir);
    FileSystem fs;
    try {
      fs = dir.getFileSystem(spark.sparkContext().hadoopConfiguration());
      if (!fs.getFileStatus(dir).isDirectory()) {
        throw new InputException("input " + inputDir + " is not a folder");
      }
    } catch (java.io.FileNotFoundException e) {
      throw new InputException("input folder " + inputDir + " does not exist");
    } catch (IOException e) {
      throw new InputException("cannot open input folder " + inputDir + ": " + e.getMessage(), e);
    }
    Path csv = new Path(dir, name + ".csv");
    Path parquetFile = new Path(dir, name + ".parquet");
    Path parquetDir = new Path(dir, name);
    List<Path> found = new ArrayList<>();
    List<Format> formats = new ArrayList<>();
    try {
      if (fs.exists(csv)) {
        found.add(csv);
        formats.add(Format.CSV);
      }
      if (fs.exists(parquetFile)) {
        found.add(parquetFile);
        formats.add(Format.PARQUET);
      }
      if (fs.exists(parquetDir) && fs.getFileStatus(parquetDir).isDirectory()) {
        found.add(parquetDir);
        formats.add(Format.PARQUET);
      }
    } catch (IOException e) {
      throw new InputException("cannot list input folder " + inputDir + ": " + e.getMessage(), e);
    }
    if (found.isEmpty()) {
      if (required) {
        throw new InputException(
            "table " + table + " is missing: expected " + name + ".csv, " + name + ".parquet or "
                + name + "/ (Parquet dataset) in " + inputDir);
      }
      return Optional.empty();
    }
    if (found.size() > 1) {
      throw new InputException(
          "table " + table + " is ambiguous: " + found + " all exist in " + inputDir
              + "; keep exactly one");
    }
    String location = found.get(0).toString();
    Format format = formats.get(0);
    Dataset<Row> rows;
    try {
      rows =
          format == Format.CSV
              ? spark.read()
                  .option("header", "true")
                  .option("inferSchema", "false")
                  .option("mode", "PERMISSIVE")
                  .csv(location)
              : spark.read().parquet(location);
    } catch (RuntimeException e) {
      throw new InputException(
          "cannot read table " + table + " from " + location + ": " + firstLine(e), e);
    }
    return Optional.of(new RawTable(table, location, format, rows));
  }

  private static String firstLine(Throwable e) {
    String m = String.valueOf(e.getMessage());
    int nl = m.indexOf('\n');
    return nl < 0 ? m : m.substring(0, nl);
  }
}
