package dev.sluice.io;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import dev.sluice.SluiceException;
import dev.sluice.config.InputSettings;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Optional;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/** Reading tables: format from the path, CSV conventions, partition columns. */
@ExtendWith(SharedSpark.class)
class TableReaderTest {
  @TempDir Path tmp;

  static final InputSettings DEFAULTS = new InputSettings(Optional.empty(), ",", Optional.empty());

  @Test
  void formatComesFromOptionThenExtensionThenParquet() {
    assertThat(TableReader.formatOf("x/data.csv", Optional.empty())).isEqualTo("csv");
    assertThat(TableReader.formatOf("x/data.JSONL", Optional.empty())).isEqualTo("json");
    assertThat(TableReader.formatOf("x/data.orc", Optional.empty())).isEqualTo("orc");
    assertThat(TableReader.formatOf("x/table", Optional.empty())).isEqualTo("parquet");
    assertThat(TableReader.formatOf("x/data.csv", Optional.of("parquet"))).isEqualTo("parquet");
    assertThatThrownBy(() -> TableReader.formatOf("x", Optional.of("xls")))
        .isInstanceOf(SluiceException.class)
        .hasMessage("Cannot set format to xls: expected one of csv, json, orc, parquet");
  }

  @Test
  void csvHasAHeaderEmptyFieldsAreNullAndTypesAreInferred(SparkSession spark) throws Exception {
    Path csv = tmp.resolve("checks.csv");
    Files.writeString(csv, "pallet_id,air_temp_c,door_openings\nPL-1,3.5,4\nPL-2,,7\nPL-3,4.25,\n");
    InputTable t = TableReader.read(spark, csv.toString(), DEFAULTS);
    assertThat(t.format()).isEqualTo("csv");
    assertThat(t.data().schema().apply("air_temp_c").dataType()).isEqualTo(DataTypes.DoubleType);
    assertThat(t.data().schema().apply("door_openings").dataType()).isEqualTo(DataTypes.IntegerType);
    assertThat(t.data().filter("air_temp_c IS NULL").count()).isEqualTo(1);
  }

  @Test
  void csvSchemaFromConfigIsUsed(SparkSession spark) throws Exception {
    Path csv = tmp.resolve("checks.csv");
    Files.writeString(csv, "a;b\n1;2\n");
    InputSettings s = new InputSettings(Optional.empty(), ";", Optional.of("a DOUBLE, b STRING"));
    InputTable t = TableReader.read(spark, csv.toString(), s);
    assertThat(t.data().schema().apply("b").dataType()).isEqualTo(DataTypes.StringType);
    assertThat(t.data().first().getDouble(0)).isEqualTo(1.0);
  }

  @Test
  void partitionColumnsComeFromTheDirectoryLayout(SparkSession spark) {
    InputTable t = TableReader.read(spark, "sample-parquet", DEFAULTS);
    assertThat(t.partitionColumns()).containsExactly("depot");
  }

  @Test
  void jsonAndOrcAreRead(SparkSession spark) {
    String json = tmp.resolve("t.json").toString();
    String orc = tmp.resolve("t.orc").toString();
    spark.sql("SELECT id, id * 1.5 AS x FROM range(3)").write().json(json);
    spark.sql("SELECT id, id * 1.5 AS x FROM range(3)").write().orc(orc);
    assertThat(TableReader.read(spark, json, DEFAULTS).data().count()).isEqualTo(3);
    assertThat(TableReader.read(spark, orc, DEFAULTS).data().count()).isEqualTo(3);
  }
}
