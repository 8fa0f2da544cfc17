package aislecast.it;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.ResultSetMetaData;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.List;

/**
 * Reads a Parquet table folder (plain or partitioned) with DuckDB, an engine independent of
 * Spark, as sorted text rows: every value printed in full ({@code Double.toString} round-trips
 * exactly), so two tables compare equal only when every value is bit-identical.
 */
final class ParquetRows {
  private ParquetRows() {}

  static List<String> read(Path tableDir) {
    assertTrue(Files.isDirectory(tableDir), "missing table " + tableDir);
    String glob = tableDir.toAbsolutePath().toString().replace("'", "''") + "/**/*.parquet";
    List<String> rows = new ArrayList<>();
    try (Connection c = DriverManager.getConnection("jdbc:duckdb:");
        Statement st = c.createStatement();
        ResultSet rs = st.executeQuery("SELECT * FROM read_parquet('" + glob
            + "', hive_partitioning = true) ORDER BY ALL")) {
      ResultSetMetaData md = rs.getMetaData();
      StringBuilder header = new StringBuilder("#");
      for (int i = 1; i <= md.getColumnCount(); i++) {
        header.append(md.getColumnName(i)).append('|');
      }
      rows.add(header.toString());
      while (rs.next()) {
        StringBuilder b = new StringBuilder();
        for (int i = 1; i <= md.getColumnCount(); i++) {
          Object v = rs.getObject(i);
          b.append(v == null ? "null" : v.toString()).append('|');
        }
        rows.add(b.toString());
      }
    } catch (SQLException e) {
      throw new AssertionError("cannot read " + tableDir + ": " + e.getMessage(), e);
    }
    return rows;
  }

  /** Asserts both tables hold the same columns and rows; returns the number of rows. */
  static int assertSame(Path expected, Path actual) {
    List<String> e = read(expected);
    List<String> a = read(actual);
    assertEquals(e.get(0), a.get(0), "columns of " + actual);
    for (int i = 1; i < Math.min(e.size(), a.size()); i++) {
      if (!e.get(i).equals(a.get(i))) {
        fail("row " + i + " of " + actual + " differs from " + expected + ":\n  expected "
            + e.get(i) + "\n  actual   " + a.get(i) + "\n(" + e.get(0) + ")");
      }
    }
    assertEquals(e.size(), a.size(), "row count of " + actual + " vs " + expected);
    return e.size() - 1;
  }
}
