package dev.sluice.bench;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.when;

import java.util.ArrayList;
import java.util.List;
import org.apache.spark.ml.feature.Imputer;
import org.apache.spark.ml.feature.ImputerModel;
import org.apache.spark.ml.feature.StandardScaler;
import org.apache.spark.ml.feature.VectorAssembler;
import org.apache.spark.ml.stat.Correlation;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.storage.StorageLevel;

/**
 * The pipeline a data engineer would write by hand from stock Spark MLlib parts, for comparison:
 * approxQuantile fences, capping with {@code when}, median imputation with {@code Imputer},
 * {@code VectorAssembler} and {@code StandardScaler}, {@code Correlation.corr}, then the write.
 * The input is cached, as a careful engineer would, since it is read several times.
 */
final class PeerPipeline {
  private PeerPipeline() {}

  static void run(Dataset<Row> input, List<String> numeric, String output) {
    Dataset<Row> data = input.persist(StorageLevel.MEMORY_AND_DISK());
    String[] cols = numeric.toArray(new String[0]);
    double[][] q = data.stat().approxQuantile(cols, new double[] {0.25, 0.75}, 0.001);
    List<Column> capped = new ArrayList<>();
    for (String other : data.columns()) {
      int i = numeric.indexOf(other);
      if (i < 0) {
        capped.add(col(other));
        continue;
      }
      double iqr = q[i][1] - q[i][0];
      double lo = q[i][0] - 1.5 * iqr;
      double hi = q[i][1] + 1.5 * iqr;
      capped.add(when(col(other).lt(lo), lit(lo)).when(col(other).gt(hi), lit(hi))
          .otherwise(col(other)).alias(other));
    }
    Dataset<Row> c = data.select(capped.toArray(new Column[0]));
    ImputerModel imputer = new Imputer().setStrategy("median").setInputCols(cols).setOutputCols(cols).fit(c);
    Dataset<Row> imputed = imputer.transform(c);
    Dataset<Row> features = new VectorAssembler().setInputCols(cols).setOutputCol("features").transform(imputed);
    Dataset<Row> scaled = new StandardScaler().setInputCol("features").setOutputCol("scaled")
        .setWithMean(true).setWithStd(true).fit(features).transform(features);
    Correlation.corr(scaled, "features").first();
    scaled.drop("features").write().mode(SaveMode.Overwrite).parquet(output);
    // Blocking: the cache's blocks (spilled to local disk) are the pipeline's to remove, in its time.
    data.unpersist(true);
  }
}
