package dev.sluice.bench;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import org.junit.jupiter.api.Test;

/**
 * Not an outside reference: the harness's own defaults, as jobs/bench.sh and docs/benchmarks.md
 * state them. One warm-up repetition before the measured ones, none in the quick mode CI runs.
 */
class BenchmarkOptionsTest {
  @Test
  void oneWarmUpRepetitionByDefaultAndNoneInQuickMode() {
    Benchmark.Options d = Benchmark.Options.parse(new String[0]);
    assertThat(d.reps()).isEqualTo(3);
    assertThat(d.warmup()).isEqualTo(1);
    Benchmark.Options q = Benchmark.Options.parse(new String[] {"--quick"});
    assertThat(q.reps()).isEqualTo(1);
    assertThat(q.warmup()).isZero();
    Benchmark.Options e = Benchmark.Options.parse(new String[] {"--reps", "5", "--warmup", "2", "--skip-peer"});
    assertThat(e.reps()).isEqualTo(5);
    assertThat(e.warmup()).isEqualTo(2);
    assertThat(e.skipPeer()).isTrue();
  }

  @Test
  void noMeasuredRepetitionOrANegativeWarmUpIsRefused() {
    assertThatThrownBy(() -> Benchmark.Options.parse(new String[] {"--reps", "0"}))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("--reps");
    assertThatThrownBy(() -> Benchmark.Options.parse(new String[] {"--warmup", "-1"}))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("--warmup");
  }
}
