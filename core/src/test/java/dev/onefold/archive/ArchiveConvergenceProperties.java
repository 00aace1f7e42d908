package dev.onefold.archive;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.archive.ChunkEntry;
import dev.onefold.internal.archive.ChunkStore;
import dev.onefold.internal.archive.IoCounters;
import dev.onefold.internal.archive.PartitionEntry;
import dev.onefold.record.Row;
import dev.onefold.spi.Storage;
import java.util.ArrayList;
import java.util.Collections;
import java.util.Comparator;
import java.util.HexFormat;
import java.util.Iterator;
import java.util.List;
import java.util.Random;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;

/**
 * Promise 1 on the archive (STYLE.md habit 12: the incremental path equals the reference path): deliveries
 * shuffled, duplicated and split into batches applied one by one give the same archive content as one batch of
 * their union, and the same records as the batch engine's model, for every policy, with tombstones and key
 * moves (partition = hour of a timestamp that changes between versions).
 */
class ArchiveConvergenceProperties {

    @Property(tries = 100)
    void applyInBatches_equalsApplyOfUnion(@ForAll long seed, @ForAll @IntRange(min = 0, max = 2) int policyIndex,
            @ForAll @IntRange(min = 1, max = 6) int batches, @ForAll boolean stable) {
        ArchiveFixtures.Policy policy = ArchiveFixtures.Policy.values()[policyIndex];
        // stable partitions are only declared when they hold: every key keeps one hour
        DatasetSpec spec = ArchiveFixtures.spec(policy, stable);
        Random r = new Random(seed);
        List<Row> records = ArchiveFixtures.randomEvents(r, 10 + r.nextInt(40), 1 + r.nextInt(20), stable ? 1 : 4);
        List<Row> deliveries = new ArrayList<>(records);
        for (int i = r.nextInt(records.size()); i > 0; i--) {
            deliveries.add(records.get(r.nextInt(records.size())));
        }
        Collections.shuffle(deliveries, r);

        Archive<Row> incremental = ArchiveFixtures.builder(spec, Storage.inMemory()).open();
        int from = 0;
        for (int b = 0; b < batches; b++) {
            int to = b == batches - 1 ? deliveries.size() : from + r.nextInt(deliveries.size() - from + 1);
            incremental.apply(deliveries.subList(from, to));
            from = to;
        }
        incremental.apply(deliveries.subList(0, r.nextInt(deliveries.size() + 1))); // a replay
        Archive<Row> once = ArchiveFixtures.builder(spec, Storage.inMemory()).open();
        once.apply(records);

        assertEquals(entries(once), entries(incremental));
        assertEquals(once.snapshot().partitions().stream().map(p -> List.of(p.values(), p.digest(), p.entries())).toList(),
                incremental.snapshot().partitions().stream().map(p -> List.of(p.values(), p.digest(), p.entries())).toList());
        List<Row> expected = ArchiveFixtures.model(spec, records);
        List<Row> actual = ArchiveFixtures.rows(incremental);
        if (policy == ArchiveFixtures.Policy.VECTOR_CLOCK) {
            // siblings stay in their anchor's partition, so keep-all output is ordered per partition only
            expected = sorted(expected);
            actual = sorted(actual);
        }
        assertEquals(expected, actual);
        assertTrue(incremental.verify().ok(), () -> incremental.verify().problems().toString());
    }

    private static List<Row> sorted(List<Row> rows) {
        List<Row> out = new ArrayList<>(rows);
        out.sort(Comparator.comparing(Row::toString));
        return out;
    }

    /** Every stored entry as hex (key, order, state bytes, deleted mark), partition by partition. */
    static List<String> entries(Archive<Row> archive) {
        ChunkStore chunks = archive.engine.chunks();
        List<String> out = new ArrayList<>();
        HexFormat hex = HexFormat.of();
        for (PartitionEntry p : archive.engine.committer().latest().partitions()) {
            Iterator<ChunkStore.Located> it = chunks.entries(p.chunks(), new IoCounters());
            while (it.hasNext()) {
                ChunkEntry e = it.next().entry();
                out.add(p.name() + " " + hex.formatHex(e.key()) + " " + hex.formatHex(e.order()) + " "
                        + hex.formatHex(e.state()) + " " + e.deletedSince());
            }
        }
        return out;
    }
}
