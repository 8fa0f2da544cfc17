package aislecast.jobs.validate;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.when;

import aislecast.jobs.config.InputConfig;
import aislecast.jobs.io.InputException;
import aislecast.jobs.io.InputTables.Format;
import aislecast.jobs.io.InputTables.RawTable;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.types.BooleanType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.NumericType;
import org.apache.spark.sql.types.StructField;

/**
 * Resolves the configuration against each table's actual columns: checks that every required
 * column exists with a usable type (failing at once with the table and column named), and fills
 * the column lists left to defaults.
 */
final class TableSpecs {

  private static final Pattern DRAW_COLUMN = Pattern.compile("nu(\\d+)");
  /** Names the validated output adds or uses internally. */
  private static final Set<String> RESERVED =
      Set.of(TableSpec.ROW, TableSpec.REASON, TableSpec.MESSAGE, InputValidator.MARKET_SIZE);

  private TableSpecs() {}

  static TableSpec sales(RawTable raw, InputConfig.Sales cfg) {
    Builder b = new Builder(raw);
    InputConfig.SalesColumns c = cfg.columns();
    b.column(c.storeId(), "store_id", FieldKind.KEY);
    b.column(c.week(), "week", FieldKind.WEEK);
    b.column(c.productId(), "product_id", FieldKind.KEY);
    b.column(c.units(), "units", FieldKind.UNITS);
    b.column(c.price(), "price", FieldKind.PRICE);
    b.listed(cfg.demandShifters(), InputConfig.Sales.DEFAULT_DEMAND_SHIFTERS, FieldKind.NUMBER,
        "input.sales.demand_shifters");
    b.listed(cfg.costShifters(), InputConfig.Sales.DEFAULT_COST_SHIFTERS,
        FieldKind.POSITIVE_NUMBER, "input.sales.cost_shifters");
    return b.build();
  }

  static TableSpec products(RawTable raw, InputConfig.Products cfg) {
    Builder b = new Builder(raw);
    b.column(cfg.columns().productId(), "product_id", FieldKind.KEY);
    b.column(cfg.columns().owner(), "owner", FieldKind.KEY);
    b.listedOrNumericRest(cfg.attributes(), "input.products.attributes");
    return b.build();
  }

  static TableSpec stores(RawTable raw, InputConfig.Stores cfg) {
    Builder b = new Builder(raw);
    b.column(cfg.columns().storeId(), "store_id", FieldKind.KEY);
    b.column(cfg.columns().region(), "region", FieldKind.KEY);
    b.column(cfg.columns().shoppers(), "shoppers", FieldKind.MARKET_SIZE);
    b.listedOrNumericRest(cfg.demographics(), "input.stores.demographics");
    return b.build();
  }

  static TableSpec traffic(RawTable raw, InputConfig.Traffic cfg) {
    Builder b = new Builder(raw);
    b.column(cfg.columns().storeId(), "store_id", FieldKind.KEY);
    b.column(cfg.columns().week(), "week", FieldKind.WEEK);
    b.column(cfg.columns().shoppers(), "shoppers", FieldKind.MARKET_SIZE);
    return b.build();
  }

  static TableSpec shopperDraws(RawTable raw, InputConfig.ShopperDraws cfg) {
    Builder b = new Builder(raw);
    b.column(cfg.columns().storeId(), "store_id", FieldKind.KEY);
    b.column(cfg.columns().draw(), "draw", FieldKind.DRAW_INDEX);
    if (cfg.drawColumns() == null) {
      TreeMap<Integer, String> byIndex = new TreeMap<>();
      for (String name : b.types.keySet()) {
        Matcher m = DRAW_COLUMN.matcher(name);
        if (m.matches() && !b.used.contains(name) && m.group(1).length() < 9) {
          byIndex.put(Integer.parseInt(m.group(1)), name);
        }
      }
      if (byIndex.isEmpty()) {
        throw new InputException(
            "table shopper_draws (" + raw.location() + "): no draw columns nu0, nu1, ... found;"
                + " columns present: " + String.join(", ", b.types.keySet()));
      }
      for (String name : byIndex.values()) {
        b.require(name, name, FieldKind.NUMBER, "input.shopper_draws.draw_columns");
      }
    } else {
      b.listed(cfg.drawColumns(), null, FieldKind.NUMBER, "input.shopper_draws.draw_columns");
    }
    return b.build();
  }

  /** Accumulates fields for one table, checking columns as they are added. */
  private static final class Builder {
    final RawTable raw;
    final Map<String, DataType> types = new LinkedHashMap<>();
    final List<TableSpec.Field> fields = new ArrayList<>();
    final Set<String> used = new HashSet<>();
    final Set<String> names = new HashSet<>();

    Builder(RawTable raw) {
      this.raw = raw;
      for (StructField f : raw.rows().schema().fields()) {
        types.put(f.name(), f.dataType());
      }
    }

    void require(String source, String name, FieldKind kind, String configKey) {
      DataType type = types.get(source);
      if (type == null) {
        throw new InputException(
            "table " + raw.table() + " (" + raw.location() + "): required column '" + source
                + "' is missing (set by " + configKey + "); columns present: "
                + (types.isEmpty() ? "none" : String.join(", ", types.keySet())));
      }
      if (raw.format() == Format.PARQUET && !kind.accepts(type)) {
        throw new InputException(
            "table " + raw.table() + " (" + raw.location() + "): column '" + source
                + "' has type " + type.simpleString() + "; expected " + kind.expectedTypes());
      }
      if (RESERVED.contains(name) || !names.add(name)) {
        throw new InputException(
            "table " + raw.table() + ": column '" + name + "' would appear twice or clashes with"
                + " a name the validated output uses; rename it or set its role in the"
                + " configuration");
      }
      used.add(source);
      fields.add(new TableSpec.Field(name, source, kind));
    }

    /** A fixed field whose column is set by {@code input.<table>.columns.<name>}. */
    void column(String source, String name, FieldKind kind) {
      require(source, name, kind, "input." + raw.table() + ".columns." + name);
    }

    /** Numbers: the listed columns, or every other numeric column when there is no list. */
    void listedOrNumericRest(List<String> explicit, String configKey) {
      if (explicit == null) {
        numericRest();
      } else {
        listed(explicit, null, FieldKind.NUMBER, configKey);
      }
    }

    /** An explicit list must exist in full; an absent list uses the defaults that exist. */
    void listed(List<String> explicit, List<String> defaults, FieldKind kind, String configKey) {
      if (explicit != null) {
        for (String c : explicit) {
          require(c, c, kind, configKey);
        }
      } else if (defaults != null) {
        for (String c : defaults) {
          if (types.containsKey(c) && !used.contains(c)) {
            require(c, c, kind, configKey + " (default)");
          }
        }
      }
    }

    /** Adds every unused column that holds numbers; text columns are left out. */
    void numericRest() {
      List<String> candidates = new ArrayList<>();
      for (Map.Entry<String, DataType> e : types.entrySet()) {
        if (!used.contains(e.getKey()) && !RESERVED.contains(e.getKey())) {
          candidates.add(e.getKey());
        }
      }
      if (candidates.isEmpty()) {
        return;
      }
      List<String> numeric = new ArrayList<>();
      if (raw.format() == Format.PARQUET) {
        for (String c : candidates) {
          DataType t = types.get(c);
          if (t instanceof NumericType || t instanceof BooleanType) {
            numeric.add(c);
          }
        }
      } else {
        // CSV has no types: a column is numeric when most of its non-empty values read as
        // numbers, so a few typos are rejected row by row instead of dropping the column.
        List<Column> aggs = new ArrayList<>();
        for (String c : candidates) {
          Column v = col("`" + c + "`");
          aggs.add(count(v));
          aggs.add(count(when(v.rlike(FieldKind.NUMERIC_TEXT_REGEX), lit(1))));
        }
        Row r =
            raw.rows().agg(aggs.get(0), aggs.subList(1, aggs.size()).toArray(new Column[0]))
                .first();
        for (int i = 0; i < candidates.size(); i++) {
          long present = r.getLong(2 * i);
          long numbers = r.getLong(2 * i + 1);
          if (present > 0 && 2 * numbers > present) {
            numeric.add(candidates.get(i));
          }
        }
      }
      for (String c : numeric) {
        require(c, c, FieldKind.NUMBER, "numeric columns (default)");
      }
    }

    TableSpec build() {
      List<String> ignored = new ArrayList<>();
      for (String c : types.keySet()) {
        if (!used.contains(c)) {
          ignored.add(c);
        }
      }
      return new TableSpec(raw.table(), fields, ignored);
    }
  }
}
