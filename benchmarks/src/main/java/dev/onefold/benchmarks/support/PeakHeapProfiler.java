package dev.onefold.benchmarks.support;

import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.util.ArrayList;
import java.util.Collection;
import java.util.List;
import org.openjdk.jmh.infra.BenchmarkParams;
import org.openjdk.jmh.infra.IterationParams;
import org.openjdk.jmh.profile.InternalProfiler;
import org.openjdk.jmh.results.AggregationPolicy;
import org.openjdk.jmh.results.IterationResult;
import org.openjdk.jmh.results.Result;
import org.openjdk.jmh.results.ScalarResult;

/**
 * A JMH profiler reporting the peak heap of each iteration as {@code peak.heap} (MiB, the maximum over
 * iterations): it resets every heap pool's peak before the iteration and adds the pools' peaks after it. The
 * pools peak at different moments, so the sum is an upper bound of the true peak; garbage not yet collected
 * counts too, which is why the spill benchmark runs in a small heap. Use with
 * {@code -prof dev.onefold.benchmarks.support.PeakHeapProfiler}.
 *
 * <p>Runs inside the benchmark JVM; JMH calls it from one thread. Each call costs one look at every memory pool.
 */
public final class PeakHeapProfiler implements InternalProfiler {
    /** The secondary result's label. */
    public static final String LABEL = "peak.heap";

    private static List<MemoryPoolMXBean> heapPools() {
        List<MemoryPoolMXBean> pools = new ArrayList<>();
        for (MemoryPoolMXBean pool : ManagementFactory.getMemoryPoolMXBeans()) {
            if (pool.getType() == MemoryType.HEAP && pool.isValid()) {
                pools.add(pool);
            }
        }
        return pools;
    }

    @Override
    public void beforeIteration(BenchmarkParams benchmarkParams, IterationParams iterationParams) {
        heapPools().forEach(MemoryPoolMXBean::resetPeakUsage);
    }

    @Override
    @SuppressWarnings("rawtypes") // JMH's InternalProfiler declares the raw Result type
    public Collection<? extends Result> afterIteration(BenchmarkParams benchmarkParams, IterationParams iterationParams,
            IterationResult result) {
        long peak = 0;
        for (MemoryPoolMXBean pool : heapPools()) {
            peak += pool.getPeakUsage().getUsed();
        }
        return List.of(new ScalarResult(LABEL, peak / (1024.0 * 1024.0), "MiB", AggregationPolicy.MAX));
    }

    @Override
    public String getDescription() {
        return "peak heap per iteration (sum of the heap pools' peaks)";
    }
}
