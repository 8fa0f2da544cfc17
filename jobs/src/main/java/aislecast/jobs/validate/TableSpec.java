package aislecast.jobs.validate;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * The fields read from one input table after resolving the configuration against the table's
 * columns: output name, source column, and kind. Built by {@link TableSpecs}.
 *
 * @param table table name used in messages and the rejects table (sales, products, ...)
 * @param fields fields in check order (keys first)
 * @param ignoredColumns columns present in the data but not used
 */
public record TableSpec(String table, List<Field> fields, List<String> ignoredColumns)
    implements Serializable {

  /** Internal columns of a parsed table. */
  static final String ROW = "_row";
  static final String REASON = "_reason";
  static final String MESSAGE = "_message";

  public TableSpec {
    fields = List.copyOf(fields);
    ignoredColumns = List.copyOf(ignoredColumns);
  }

  /** One field: {@code name} in the validated output, read from {@code source}. */
  public record Field(String name, String source, FieldKind kind) implements Serializable {}

  /** Output names of the fields of the given kind, in order. */
  public List<String> names(FieldKind kind) {
    List<String> out = new ArrayList<>();
    for (Field f : fields) {
      if (f.kind() == kind) {
        out.add(f.name());
      }
    }
    return out;
  }

  /** Schema of a parsed table: row number, fields, reject reason and message. */
  StructType parsedSchema() {
    List<StructField> out = new ArrayList<>();
    out.add(DataTypes.createStructField(ROW, DataTypes.LongType, false));
    for (Field f : fields) {
      out.add(DataTypes.createStructField(f.name(), f.kind().outputType(), true));
    }
    out.add(DataTypes.createStructField(REASON, DataTypes.StringType, true));
    out.add(DataTypes.createStructField(MESSAGE, DataTypes.StringType, true));
    return DataTypes.createStructType(out);
  }
}
