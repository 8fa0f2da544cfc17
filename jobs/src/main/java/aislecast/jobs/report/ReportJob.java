package aislecast.jobs.report;

import aislecast.jobs.config.RunFailure;
import java.io.IOException;
import java.io.OutputStream;
import java.io.PrintWriter;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.UUID;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.SparkSession;

/**
 * {@code aislecast report} as a recipe: find the run folders' tables, read the numbers with
 * Spark, draw the charts, write one self-contained HTML page, and publish it whole (a hidden
 * staging file or folder renamed into place), so nobody opens half a report.
 */
public final class ReportJob {
  /** Default place of the report inside the run folder. */
  public static final String REPORT_DIR = "report";
  public static final String INDEX = "index.html";

  private ReportJob() {}

  /**
   * @param run the run folder reported on
   * @param extraRuns more run folders whose tables join the report (e.g. a recommend run next to
   *     a scenarios run); the estimation run a scenarios run names is found on its own
   * @param store store of the elasticity heat map, or null for the first store
   * @param output report file, or null for {@code <run>/report/index.html}
   */
  public record Options(String run, List<String> extraRuns, String store, String output) {}

  /** Where the report went, how many charts it holds, and what it could not show. */
  public record Result(String path, int charts, List<String> notes) {}

  /**
   * Whether {@code runDir} (or the estimation run it names) holds any table the report draws,
   * so a caller such as {@code demo} can skip a report that would be notes only.
   */
  public static boolean hasTables(SparkSession spark, String runDir) {
    RunTables tables = RunTables.open(spark.sparkContext().hadoopConfiguration(), runDir,
        List.of());
    for (String t : List.of(RunTables.SUMMARY, RunTables.GLOBAL_DRAWS, RunTables.STORE_SUMMARY,
        RunTables.ELASTICITIES, RunTables.RECOMMENDATIONS)) {
      if (tables.find(t) != null) {
        return true;
      }
    }
    return false;
  }

  public static Result run(SparkSession spark, Options o, PrintWriter out) {
    RunTables tables = RunTables.open(spark.sparkContext().hadoopConfiguration(), o.run(),
        o.extraRuns());
    ReportData data = ReportReader.read(spark, tables, o.store());
    String html = HtmlReport.render(data, o.run());
    String path = o.output() == null
        ? publishFolder(tables.fs(), new Path(o.run()), html)
        : publishFile(tables.fs(), new Path(o.output()), html);
    int charts = HtmlReport.countImages(html);
    out.println("report: " + charts + " charts, " + data.notes().size() + " notes");
    for (String n : data.notes()) {
      out.println("  note: " + n);
    }
    out.println("report: written to " + path);
    out.flush();
    return new Result(path, charts, data.notes());
  }

  /** Writes {@code <run>/report/index.html}, replacing an older report only once the new one is whole. */
  static String publishFolder(FileSystem fs, Path run, String html) {
    Path target = new Path(run, REPORT_DIR);
    String nonce = UUID.randomUUID().toString();
    Path staging = new Path(run, ".report-staging-" + nonce);
    Path old = new Path(run, ".report-old-" + nonce);
    try {
      try {
        write(fs, new Path(staging, INDEX), html);
        boolean hadOld = fs.exists(target);
        if (hadOld && !fs.rename(target, old)) {
          throw new RunFailure(RunFailure.OTHER, "cannot move the previous report " + target
              + " aside");
        }
        if (!fs.rename(staging, target)) {
          if (hadOld) {
            fs.rename(old, target);
          }
          throw new RunFailure(RunFailure.OTHER, "cannot rename " + staging + " to " + target);
        }
        if (hadOld) {
          fs.delete(old, true);
        }
      } finally {
        if (fs.exists(staging)) {
          fs.delete(staging, true);
        }
      }
      return display(fs, new Path(target, INDEX));
    } catch (IOException e) {
      throw new RunFailure(RunFailure.OTHER, "cannot write the report under " + target + ": "
          + e.getMessage(), e);
    }
  }

  /** Writes {@code file} through a hidden staging file beside it. */
  static String publishFile(FileSystem fs, Path file, String html) {
    Path parent = file.getParent() == null ? new Path(".") : file.getParent();
    Path staging = new Path(parent, "." + file.getName() + ".staging-" + UUID.randomUUID());
    try {
      try {
        if (fs.exists(file) && fs.getFileStatus(file).isDirectory()) {
          throw new RunFailure(RunFailure.BAD_INPUT, "--output " + file + " is a folder; give a"
              + " file name such as report.html");
        }
        write(fs, staging, html);
        if (fs.exists(file) && !fs.delete(file, false)) {
          throw new RunFailure(RunFailure.OTHER, "cannot replace " + file);
        }
        if (!fs.rename(staging, file)) {
          throw new RunFailure(RunFailure.OTHER, "cannot rename " + staging + " to " + file);
        }
      } finally {
        if (fs.exists(staging)) {
          fs.delete(staging, false);
        }
      }
      return display(fs, file);
    } catch (IOException e) {
      throw new RunFailure(RunFailure.OTHER, "cannot write the report to " + file + ": "
          + e.getMessage(), e);
    }
  }

  private static void write(FileSystem fs, Path p, String html) throws IOException {
    try (OutputStream os = fs.create(p, false)) {
      os.write(html.getBytes(StandardCharsets.UTF_8));
    }
  }

  /** A local path as a plain absolute path (what a browser or a shell wants), else the URI. */
  private static String display(FileSystem fs, Path p) {
    Path q = fs.makeQualified(p);
    return "file".equals(q.toUri().getScheme()) ? q.toUri().getPath() : q.toString();
  }
}
