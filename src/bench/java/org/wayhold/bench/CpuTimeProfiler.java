package org.wayhold.bench;

import java.lang.management.ManagementFactory;
import java.lang.management.ThreadInfo;
import java.lang.management.ThreadMXBean;
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
 * CPU time of JMH's worker threads per operation ({@code -prof org.wayhold.bench.CpuTimeProfiler}).
 *
 * <p>The machine's two cores are shared with other work, so wall-clock scores move with the load: a
 * thread that waits for a core is still "running" to the clock. The thread's own CPU time
 * ({@link ThreadMXBean#getThreadCpuTime}) counts only the time it ran, so ratios between benchmarks
 * measured this way are far steadier. It still includes cache and memory effects of sharing, and
 * nothing of the JIT or the garbage collector, whose threads are not counted.
 */
public final class CpuTimeProfiler implements InternalProfiler {

    private final ThreadMXBean threads = ManagementFactory.getThreadMXBean();
    private long startNs;

    @Override
    public String getDescription() {
        return "CPU time of the benchmark's worker threads per operation";
    }

    @Override
    public void beforeIteration(BenchmarkParams benchmarkParams, IterationParams iterationParams) {
        startNs = workerCpuNs();
    }

    @Override
    public Collection<? extends Result> afterIteration(BenchmarkParams benchmarkParams, IterationParams iterationParams,
                                                       IterationResult result) {
        long cpuNs = workerCpuNs() - startNs;
        // Measured operations already count @OperationsPerInvocation.
        double ops = result.getMetadata().getMeasuredOps();
        return List.of(new ScalarResult("cpu", cpuNs / ops, "ns/op", AggregationPolicy.AVG));
    }

    private long workerCpuNs() {
        long sum = 0;
        for (ThreadInfo info : threads.getThreadInfo(threads.getAllThreadIds())) {
            if (info != null && info.getThreadName().contains("jmh-worker")) {
                long ns = threads.getThreadCpuTime(info.getThreadId());
                if (ns > 0) {
                    sum += ns;
                }
            }
        }
        return sum;
    }
}
