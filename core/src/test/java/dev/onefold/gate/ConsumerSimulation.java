package dev.onefold.gate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.OptionalLong;
import java.util.Random;
import java.util.TreeSet;

/**
 * A consumer service driven by a random script: reads partition logs through a gate, writes emits to a
 * {@link GateFixtures.Sink}, acknowledges in random batches out of order, commits the gate's safe offsets
 * at random points, seeks back (redelivery) and crashes (gate, unacknowledged emits and read positions lost;
 * restart from committed offsets). Checks after every step: no committable offset passes a held or
 * unacknowledged record, the memory bounds hold, counts add up, committed offsets never move back.
 */
final class ConsumerSimulation {
    final DatasetSpec spec;
    final List<List<Row>> logs;
    final GateFixtures.Sink sink;
    final Random rnd;
    boolean exact = true;
    long windowKeys = 1000;
    Long lateness;
    long maxHeld = 1_000_000;
    long maxAwaiting = 1_000_000;
    int crashesLeft = 3;

    /** Per gate lifetime: every final decision in order, and the eviction count at each. */
    final List<List<Decision<Row>>> decisionsPerLifetime = new ArrayList<>();
    final List<List<Long>> evictionsPerLifetime = new ArrayList<>();
    long maxInFlightSeen;

    private final long[] committed;
    private StreamGate<Row> gate;
    private final List<Decision<Row>> unacked = new ArrayList<>();
    private final List<TreeSet<Long>> outstanding = new ArrayList<>();

    ConsumerSimulation(DatasetSpec spec, List<List<Row>> logs, GateFixtures.Sink sink, long seed) {
        this.spec = spec;
        this.logs = logs;
        this.sink = sink;
        this.rnd = new Random(seed);
        this.committed = new long[logs.size()];
    }

    private static String name(int p) {
        return "p" + p;
    }

    private StreamGate<Row> newGate() {
        StreamGate.Builder<Row> b = StreamGate.builder(spec, RecordAccess.rows(GateFixtures.SCHEMA))
                .windowKeys(windowKeys)
                .maxHeld(maxHeld, 1L << 30, StreamGate.WhenFull.RELEASE_EARLY)
                .maxAwaitingAck(maxAwaiting, 1L << 30);
        if (exact) {
            b.exact(sink);
        } else {
            b.windowed();
        }
        if (lateness != null) {
            b.reorder("at", lateness);
        }
        return b.build();
    }

    void run() {
        boolean finished = false;
        while (!finished) {
            gate = newGate();
            unacked.clear();
            outstanding.clear();
            long[] position = committed.clone();
            for (int p = 0; p < logs.size(); p++) {
                outstanding.add(new TreeSet<>());
                if (rnd.nextBoolean()) {
                    gate.resumeAt(name(p), committed[p]);
                }
            }
            decisionsPerLifetime.add(new ArrayList<>());
            evictionsPerLifetime.add(new ArrayList<>());
            finished = lifetime(position);
        }
    }

    /** One gate lifetime; returns true when everything was consumed and committed, false after a crash. */
    private boolean lifetime(long[] position) {
        while (true) {
            int step = rnd.nextInt(100);
            if (step < 3 && crashesLeft > 0) {
                crashesLeft--;
                return false;
            }
            if (step < 25 && !unacked.isEmpty()) {
                acknowledgeSome();
            } else if (step < 32) {
                commit();
            } else if (step < 35) {
                int p = rnd.nextInt(logs.size());
                position[p] = committed[p] + (position[p] > committed[p] ? rnd.nextInt((int) (position[p] - committed[p])) : 0);
            } else {
                List<Integer> readable = new ArrayList<>();
                for (int p = 0; p < logs.size(); p++) {
                    if (position[p] < logs.get(p).size()) {
                        readable.add(p);
                    }
                }
                if (readable.isEmpty()) {
                    apply(gate.flush());
                    while (!unacked.isEmpty()) {
                        acknowledgeSome();
                    }
                    commit();
                    for (int p = 0; p < logs.size(); p++) {
                        if (committed[p] != logs.get(p).size()) {
                            throw new AssertionError("partition " + p + " committed " + committed[p] + " of "
                                    + logs.get(p).size() + " with nothing in flight");
                        }
                    }
                    return true;
                }
                int p = readable.get(rnd.nextInt(readable.size()));
                makeRoom();
                long offset = position[p]++;
                apply(gate.offer(name(p), offset, logs.get(p).get((int) offset)));
            }
            checkInvariants();
        }
    }

    /** A sink that keeps up: when its bound is full it acknowledges before the consumer offers again. */
    private void makeRoom() {
        while (gate.metrics().awaitingAck() >= maxAwaiting) {
            acknowledgeSome();
        }
    }

    private void apply(List<Decision<Row>> decisions) {
        for (Decision<Row> d : decisions) {
            TreeSet<Long> out = outstanding.get(Integer.parseInt(d.partition().substring(1)));
            switch (d.action()) {
                case HOLD -> out.add(d.offset());
                case DROP -> {
                    if (d.reason() != Decision.Reason.REDELIVERED) {
                        out.remove(d.offset());
                    }
                }
                case EMIT -> {
                    out.add(d.offset());
                    sink.write(d);
                    unacked.add(d);
                }
            }
            if (d.action() != Decision.Action.HOLD) {
                decisionsPerLifetime.get(decisionsPerLifetime.size() - 1).add(d);
                // only windowed mode's property reads eviction counts; taking them costs a metrics snapshot
                evictionsPerLifetime.get(evictionsPerLifetime.size() - 1).add(exact ? 0 : gate.metrics().windowEvictions());
            }
        }
    }

    private void acknowledgeSome() {
        int n = 1 + rnd.nextInt(Math.min(4, unacked.size()));
        List<Decision<Row>> batch = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            batch.add(unacked.remove(rnd.nextInt(unacked.size())));
        }
        sink.durablyStore(batch);
        for (Decision<Row> d : batch) {
            outstanding.get(Integer.parseInt(d.partition().substring(1))).remove(d.offset());
        }
        if (batch.size() == 1 && rnd.nextBoolean()) {
            gate.acknowledge(batch.get(0));
        } else {
            gate.acknowledgeAll(batch);
        }
        if (rnd.nextInt(5) == 0) {
            gate.acknowledgeAll(batch); // repeated acknowledgements are harmless
        }
    }

    private void commit() {
        for (int p = 0; p < logs.size(); p++) {
            OptionalLong c = gate.committableOffset(name(p));
            if (c.isPresent()) {
                assertTrue(c.getAsLong() >= committed[p], "commit moved back on partition " + p);
                committed[p] = c.getAsLong();
            }
        }
    }

    private void checkInvariants() {
        GateMetrics m = gate.metrics();
        maxInFlightSeen = Math.max(maxInFlightSeen, m.inFlight());
        assertTrue(m.held() <= maxHeld, "held " + m.held() + " exceeds bound " + maxHeld);
        assertTrue(m.inFlight() <= maxHeld + maxAwaiting, "in-flight " + m.inFlight() + " exceeds both bounds");
        assertEquals(m.offered(), m.emitted() + m.duplicates() + m.superseded() + m.conflictsLost() + m.redelivered()
                + m.rejected() + m.held(), "counts add up");
        Map<String, Long> committable = new HashMap<>(gate.committableOffsets());
        for (int p = 0; p < logs.size(); p++) {
            TreeSet<Long> out = outstanding.get(p);
            Long c = committable.get(name(p));
            if (!out.isEmpty() && c != null) {
                assertTrue(c <= out.first(), "partition " + p + ": committable " + c
                        + " passes outstanding offset " + out.first());
            }
        }
    }
}
