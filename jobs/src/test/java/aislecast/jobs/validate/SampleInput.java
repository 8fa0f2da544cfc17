package aislecast.jobs.validate;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A small valid input set as CSV lines, which tests mutate before writing. Data rows are
 * numbered from 1 (the header is not a row), as in the rejects table.
 *
 * <p>Layout: stores S1 (1000 shoppers), S2 (800); weeks 2024-01-01 and 2024-01-08; products
 * P1-P3 on every shelf, P4 in products but never sold; traffic for S1 week 1 (900) and S2 week 2
 * (700); two shopper draws per store.
 */
public final class SampleInput {
  public final Map<String, List<String>> tables = new LinkedHashMap<>();

  public SampleInput() {
    List<String> sales = new ArrayList<>();
    sales.add("store_id,week,product_id,units,price,on_display,unit_cost");
    String[] stores = {"S1", "S2"};
    String[] weeks = {"2024-01-01", "2024-01-08"};
    String[] products = {"P1", "P2", "P3"};
    int k = 0;
    for (String s : stores) {
      for (String w : weeks) {
        for (String p : products) {
          k++;
          sales.add(s + "," + w + "," + p + "," + (k * 7 % 23) + "," + (1.0 + 0.25 * (k % 4))
              + "," + (k % 2) + "," + (0.5 + 0.05 * k));
        }
      }
    }
    tables.put("sales", sales);
    tables.put("products", new ArrayList<>(List.of(
        "product_id,owner,name,sugar_free,volume_l",
        "P1,Bramblewood Co,Bramble Sparkle,0,0.33",
        "P2,Bramblewood Co,Bramble Sparkle Zero,1,0.33",
        "P3,Harrow Springs,Harrow Iced Tea,0,0.5",
        "P4,Harrow Springs,Harrow Lime,1,1.0")));
    tables.put("stores", new ArrayList<>(List.of(
        "store_id,region,shoppers,median_income",
        "S1,Fernvale,1000,51.5",
        "S2,Quarry Hill,800,47.25")));
    tables.put("traffic", new ArrayList<>(List.of(
        "store_id,week,shoppers",
        "S1,2024-01-01,900",
        "S2,2024-01-08,700")));
    tables.put("shopper_draws", new ArrayList<>(List.of(
        "store_id,draw,nu0,nu1",
        "S1,0,0.12,-1.5",
        "S1,1,-0.7,0.33",
        "S2,0,1.1,0.05",
        "S2,1,-0.2,-0.9")));
  }

  /** Data row {@code row} (1-based) of {@code table}. */
  public String row(String table, int row) {
    return tables.get(table).get(row);
  }

  /** Replaces field {@code column} of data row {@code row}. */
  public SampleInput set(String table, int row, String column, String value) {
    List<String> lines = tables.get(table);
    String[] header = lines.get(0).split(",", -1);
    String[] fields = lines.get(row).split(",", -1);
    int i = List.of(header).indexOf(column);
    if (i < 0) {
      throw new IllegalArgumentException("no column " + column + " in " + table);
    }
    fields[i] = value;
    lines.set(row, String.join(",", fields));
    return this;
  }

  /** Appends a data row; returns its 1-based row number. */
  public int append(String table, String line) {
    tables.get(table).add(line);
    return tables.get(table).size() - 1;
  }

  public SampleInput drop(String table) {
    tables.remove(table);
    return this;
  }

  /** Number of data rows of {@code table}. */
  public int rows(String table) {
    return tables.get(table).size() - 1;
  }

  /** Data row numbers of sales rows whose store and week match. */
  public List<Integer> salesRows(String store, String week) {
    List<Integer> out = new ArrayList<>();
    List<String> lines = tables.get("sales");
    for (int i = 1; i < lines.size(); i++) {
      String[] f = lines.get(i).split(",", -1);
      if (f[0].equals(store) && (week == null || f[1].equals(week))) {
        out.add(i);
      }
    }
    return out;
  }

  /** Writes every table as {@code <name>.csv} into {@code dir}. */
  public Path writeCsv(Path dir) {
    try {
      Files.createDirectories(dir);
      for (Map.Entry<String, List<String>> e : tables.entrySet()) {
        Files.write(dir.resolve(e.getKey() + ".csv"), e.getValue());
      }
      return dir;
    } catch (IOException e) {
      throw new UncheckedIOException(e);
    }
  }
}
