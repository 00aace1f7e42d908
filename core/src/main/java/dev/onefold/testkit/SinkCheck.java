package dev.onefold.testkit;

import dev.onefold.BatchEngine;
import dev.onefold.BatchResult;
import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.record.FieldPath;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collection;
import java.util.Comparator;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Optional;
import java.util.Random;
import java.util.Set;
import java.util.TreeMap;

/**
 * The test kit's front door: runs a team's {@link Sink} through at-least-once delivery {@link Schedule}s and
 * checks that it ends in the state onefold's {@link BatchEngine} computes for the same records under the same
 * {@link DatasetSpec}. Plain JUnit 5 tests call {@link #verifySeeds} (a seeded loop that shrinks the first
 * failure); jqwik properties call {@link #verify} on schedules from
 * {@code dev.onefold.testkit.jqwik.SinkArbitraries} and let jqwik shrink.
 *
 * <p>States are compared per key, ignoring read-back order: a key differs when the multiset of its records'
 * canonical bytes differs. Needs no test framework at run time; failures are {@link SinkDivergedError}s.
 *
 * <p>Immutable and thread-safe as long as the sink factory is; each run opens its own sink. Cost: one sink
 * run per schedule plus one batch-engine pass over its records; shrinking costs at most the shrink budget in
 * further runs.
 */
public final class SinkCheck<R> {
    /** Default cap on the extra sink runs spent shrinking a failure. */
    public static final int DEFAULT_SHRINK_BUDGET = 400;

    private final BatchEngine<R> engine;
    private final RecordAccess<R> access;
    private final BoundDataset dataset;
    private final List<FieldPath> keyPaths;
    private final SinkFactory<R> sinks;
    private final int shrinkBudget;

    private SinkCheck(DatasetSpec spec, RecordAccess<R> access, SinkFactory<R> sinks, int shrinkBudget) {
        this.access = Objects.requireNonNull(access, "access");
        this.sinks = Objects.requireNonNull(sinks, "sinks");
        this.engine = BatchEngine.builder(spec, access).parallel(false).build();
        this.dataset = BoundDataset.bind(spec, access.schema());
        this.keyPaths = spec.key().stream().map(access.schema()::resolve).toList();
        this.shrinkBudget = shrinkBudget;
    }

    /**
     * A check for sinks of any record type.
     *
     * @throws OnefoldException (INVALID_SPEC) when the spec does not fit the access's schema
     */
    public static <R> SinkCheck<R> of(DatasetSpec spec, RecordAccess<R> access, SinkFactory<R> sinks) {
        return new SinkCheck<>(spec, access, sinks, DEFAULT_SHRINK_BUDGET);
    }

    /** A check for sinks of onefold's own {@link Row}s. */
    public static SinkCheck<Row> forRows(DatasetSpec spec, RowSchema schema, SinkFactory<Row> sinks) {
        return of(spec, RecordAccess.rows(schema), sinks);
    }

    /** The same check with another cap on shrinking runs (0 turns shrinking off). */
    public SinkCheck<R> withShrinkBudget(int runs) {
        if (runs < 0) {
            throw OnefoldException.usage("shrink budget must not be negative, got " + runs);
        }
        return new SinkCheck<>(engine.spec(), access, sinks, runs);
    }

    /**
     * The state a correct sink holds after any at-least-once delivery of these records: the batch engine's
     * survivors, in dataset order.
     *
     * @throws OnefoldException (USAGE) when the engine rejects a record, naming its position and the reason
     */
    public List<R> expectedState(Collection<? extends R> records) {
        BatchResult<R> result = engine.dedupe(records);
        if (!result.rejections().isEmpty()) {
            Rejection first = result.rejections().get(0);
            throw OnefoldException.usage("the test kit needs valid records, but record " + first.position() + " is rejected: "
                    + first.reason() + " (" + result.rejections().size() + " rejected in all)");
        }
        return result.survivors();
    }

    /** Runs one schedule on a fresh sink without shrinking; empty when the sink converged. */
    public Optional<Divergence<R>> run(Schedule<R> schedule) {
        Failure<R> failure = runSteps(schedule.steps());
        return failure == null ? Optional.empty() : Optional.of(divergence(schedule, schedule.steps(), 0, "", failure));
    }

    /**
     * Runs one schedule on a fresh sink, as a jqwik property does for each generated schedule.
     *
     * @throws SinkDivergedError when the sink does not converge, with the full report
     */
    public void verify(Schedule<R> schedule) {
        Optional<Divergence<R>> d = run(schedule);
        if (d.isPresent()) {
            throw new SinkDivergedError(d.get());
        }
    }

    /**
     * The plain JUnit 5 way: for seeds {@code firstSeed, firstSeed + 1, ...} generates records and a schedule
     * and runs the sink; the first failure is shrunk to the smallest failing steps found and thrown.
     *
     * @throws SinkDivergedError naming the failing seed, the try and the smallest failing steps
     */
    public void verifySeeds(RecordGenerator<R> records, ScheduleSettings settings, long firstSeed, int tries) {
        if (tries < 1) {
            throw OnefoldException.usage("tries must be at least 1, got " + tries);
        }
        for (int i = 0; i < tries; i++) {
            long seed = firstSeed + i;
            Schedule<R> schedule = Schedule.generate(records.generate(new Random(seed)), settings, seed);
            Failure<R> failure = runSteps(schedule.steps());
            if (failure != null) {
                throw new SinkDivergedError(shrink(schedule, failure, "try " + (i + 1) + " of " + tries));
            }
        }
    }

    /** {@link #verifySeeds(RecordGenerator, ScheduleSettings, long, int)} with the same records on every try. */
    public void verifySeeds(List<R> records, ScheduleSettings settings, long firstSeed, int tries) {
        List<R> fixed = List.copyOf(records);
        verifySeeds(random -> fixed, settings, firstSeed, tries);
    }

    /**
     * Greedy shrinking: drop runs of steps (halves down to single steps), then single entries, keeping each
     * cut that still fails, until nothing more can be cut or the budget is spent. Any step sequence is a fair
     * test, since a sink must keep whatever {@code apply} acknowledged.
     */
    private Divergence<R> shrink(Schedule<R> schedule, Failure<R> firstFailure, String context) {
        List<Step<R>> current = schedule.steps();
        Failure<R> failure = firstFailure;
        int runs = 0;
        boolean cut = true;
        while (cut && runs < shrinkBudget) {
            cut = false;
            for (int chunk = Math.max(1, current.size() / 2); chunk >= 1 && runs < shrinkBudget; chunk /= 2) {
                for (int start = 0; start + chunk <= current.size() && runs < shrinkBudget; ) {
                    List<Step<R>> candidate = new ArrayList<>(current.subList(0, start));
                    candidate.addAll(current.subList(start + chunk, current.size()));
                    Failure<R> f = candidate.stream().anyMatch(s -> s instanceof Step.Delivery) ? runSteps(candidate) : null;
                    runs++;
                    if (f != null) {
                        current = candidate;
                        failure = f;
                        cut = true;
                    } else {
                        start++;
                    }
                }
            }
            for (int s = 0; s < current.size() && runs < shrinkBudget; s++) {
                if (!(current.get(s) instanceof Step.Delivery<R> d) || d.entries().size() < 2) {
                    continue;
                }
                for (int e = 0; e < d.entries().size() && d.entries().size() > 1 && runs < shrinkBudget; ) {
                    List<LogEntry<R>> fewer = new ArrayList<>(d.entries());
                    fewer.remove(e);
                    List<Step<R>> candidate = new ArrayList<>(current);
                    candidate.set(s, new Step.Delivery<>(fewer));
                    Failure<R> f = runSteps(candidate);
                    runs++;
                    if (f != null) {
                        current = candidate;
                        failure = f;
                        d = (Step.Delivery<R>) candidate.get(s);
                        cut = true;
                    } else {
                        e++;
                    }
                }
            }
        }
        return divergence(schedule, current, runs, context, failure);
    }

    private Divergence<R> divergence(Schedule<R> schedule, List<Step<R>> steps, int runs, String context, Failure<R> f) {
        return new Divergence<>(schedule, steps, runs, context, f.error, f.differences, f.expectedKeys,
                r -> access.toRow(r).toString());
    }

    /** What one failing run found; null from {@link #runSteps} means the sink converged. */
    private record Failure<R>(Throwable error, List<KeyDifference<R>> differences, int expectedKeys) {}

    private Failure<R> runSteps(List<Step<R>> steps) {
        Set<R> delivered = new LinkedHashSet<>();
        for (Step<R> s : steps) {
            if (s instanceof Step.Delivery<R> d) {
                delivered.addAll(d.records());
            }
        }
        Map<byte[], List<R>> expected = byKey(expectedState(delivered));
        Collection<R> actual;
        try {
            actual = feed(steps);
        } catch (Exception | AssertionError e) {
            return new Failure<>(e, List.of(), expected.size());
        }
        Map<byte[], List<R>> actualByKey;
        try {
            actualByKey = byKey(actual);
        } catch (OnefoldException e) {
            return new Failure<>(new OnefoldException(e.kind(), "sink read back a record that does not fit the dataset: "
                    + e.getMessage(), e), List.of(), expected.size());
        }
        List<KeyDifference<R>> differences = compare(expected, actualByKey);
        return differences.isEmpty() ? null : new Failure<>(null, differences, expected.size());
    }

    /** Opens a sink, runs the steps, reads the state, and closes the sink whatever happened. */
    private Collection<R> feed(List<Step<R>> steps) throws Exception {
        Sink<R> sink = sinks.open();
        Throwable failure = null;
        try {
            for (Step<R> s : steps) {
                if (s instanceof Step.Delivery<R> d) {
                    sink.apply(d);
                } else {
                    sink.restart();
                }
            }
            return List.copyOf(sink.readState());
        } catch (Exception | Error e) {
            failure = e;
            throw e;
        } finally {
            try {
                sink.close();
            } catch (Exception e) {
                if (failure == null) {
                    throw e;
                }
                failure.addSuppressed(e);
            }
        }
    }

    private List<KeyDifference<R>> compare(Map<byte[], List<R>> expected, Map<byte[], List<R>> actual) {
        TreeMap<byte[], Boolean> keys = new TreeMap<>(Arrays::compareUnsigned);
        expected.keySet().forEach(k -> keys.put(k, true));
        actual.keySet().forEach(k -> keys.put(k, true));
        List<KeyDifference<R>> out = new ArrayList<>();
        for (byte[] k : keys.keySet()) {
            List<R> e = expected.getOrDefault(k, List.of());
            List<R> a = actual.getOrDefault(k, List.of());
            if (!canonical(e).equals(canonical(a))) {
                R any = e.isEmpty() ? a.get(0) : e.get(0);
                Row row = access.toRow(any);
                out.add(new KeyDifference<>(keyPaths.stream().map(p -> p.read(row)).toList(), e, a));
            }
        }
        return out;
    }

    /** The records of one key as a sorted list of canonical encodings, so comparison ignores order. */
    private List<String> canonical(List<R> records) {
        List<String> out = new ArrayList<>(records.size());
        for (R r : records) {
            out.add(java.util.HexFormat.of().formatHex(RowCodec.encode(access.toRow(r))));
        }
        out.sort(Comparator.naturalOrder());
        return out;
    }

    private Map<byte[], List<R>> byKey(Collection<R> records) {
        TreeMap<byte[], List<R>> out = new TreeMap<>(Arrays::compareUnsigned);
        for (R r : records) {
            out.computeIfAbsent(dataset.key(access.toRow(r)), k -> new ArrayList<>()).add(r);
        }
        return out;
    }
}
