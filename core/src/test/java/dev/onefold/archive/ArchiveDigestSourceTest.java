package dev.onefold.archive;

import static dev.onefold.archive.ArchiveFixtures.DAY0;
import static dev.onefold.archive.ArchiveFixtures.HOUR;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.archive.ManifestFormat;
import dev.onefold.internal.archive.MemoryStorage;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.reconcile.Digest;
import dev.onefold.reconcile.DigestSource;
import dev.onefold.reconcile.DigestSourceContract;
import dev.onefold.reconcile.JdbcDigests;
import dev.onefold.reconcile.PartitionId;
import dev.onefold.reconcile.Reconciliation;
import dev.onefold.reconcile.ReconciliationReport;
import dev.onefold.reconcile.ReconciliationReport.KeyDifference;
import dev.onefold.reconcile.ReconciliationReport.PartitionResult;
import dev.onefold.reconcile.ReconciliationReport.Verdict;
import dev.onefold.reconcile.RecordDigests;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.PayloadCodec;
import dev.onefold.spi.RecordAccess;
import dev.onefold.spi.Storage;
import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.PreparedStatement;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.SortedMap;
import java.util.TreeMap;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

/**
 * An archive snapshot as a reconciliation source: it meets the {@link DigestSourceContract}, its partition ids
 * are {@code BoundDataset.partition} values, its digests equal those of a record stream of the same content and
 * are served from the manifest without reading any file, drill-down reads only the partition asked about, and an
 * archive reconciles against a table in an embedded SQL engine (H2).
 */
class ArchiveDigestSourceTest {

    private static Archive<Row> applied(DatasetSpec spec, Storage storage, List<Row> deliveries, int batches) {
        Archive<Row> a = ArchiveFixtures.builder(spec, storage).open();
        int step = Math.max(1, deliveries.size() / batches);
        for (int from = 0; from < deliveries.size(); from += step) {
            a.apply(deliveries.subList(from, Math.min(deliveries.size(), from + step)));
        }
        return a;
    }

    private static SortedMap<PartitionId, Digest> live(SortedMap<PartitionId, Digest> digests) {
        SortedMap<PartitionId, Digest> out = new TreeMap<>(digests);
        out.values().removeIf(d -> d.keys() == 0);
        return out;
    }

    private static RecordDigests<Row> deliveries(DatasetSpec spec, List<Row> rows) {
        return RecordDigests.ofRows("deliveries", spec, ArchiveFixtures.EVENT, rows::stream, RecordDigests.Mode.DELIVERIES)
                .memoryBudgetBytes(1 << 20).build();
    }

    // --- the contract and equal digests ---

    @ParameterizedTest
    @EnumSource(ArchiveFixtures.Policy.class)
    void digestSource_meetsTheContractWithTombstonesAndKeyMoves(ArchiveFixtures.Policy policy) {
        DatasetSpec spec = ArchiveFixtures.spec(policy, false);
        List<Row> events = ArchiveFixtures.randomEvents(new Random(31), 1500, 300, 6);
        Archive<Row> archive = applied(spec, Storage.inMemory(), events, 5);
        DigestSource source = archive.snapshot().digestSource("archive");

        DigestSourceContract.verify(source, ArchiveFixtures.EVENT);
        assertEquals(live(deliveries(spec, events).digests()), live(source.digests()));
        assertTrue(source.digests().values().stream().anyMatch(d -> d.aggregates().get(0) != null), "sum(val) was computed");
        assertTrue(source.digests().keySet().stream().allMatch(p -> p.values().size() == 1
                && p.values().get(0).matches("2024-0[23]-\\d\\dT\\d\\d")), source.digests().keySet().toString());
    }

    @Test
    void digestSource_unpartitionedDatasetIsTheWholePartition() {
        DatasetSpec spec = DatasetSpec.builder().key("id").orderBy("ts").lastWriter("seq").tombstone("deleted")
                .check(DatasetSpec.Aggregate.MAX, "val").build();
        List<Row> events = ArchiveFixtures.randomEvents(new Random(5), 400, 120, 3);
        DigestSource source = applied(spec, Storage.inMemory(), events, 3).snapshot().digestSource("archive");

        assertEquals(Set.of(PartitionId.WHOLE), source.digests().keySet());
        DigestSourceContract.verify(source, ArchiveFixtures.EVENT);
        assertEquals(deliveries(spec, events).digests(), source.digests());
    }

    /** Partition values that storage names must escape or hash map back to the values a record stream gives. */
    @Test
    void digestSource_hostilePartitionValuesMapToTheValuesOfTheRecords() {
        DatasetSpec spec = DatasetSpec.builder().key("id").orderBy("ts").partitionByValues("id").lastWriter("seq")
                .check(DatasetSpec.Aggregate.SUM, "val").build();
        List<String> ids = List.of("../", "/", "\\", "a\u0000b", "", "x".repeat(300), "\u00e9t\u00e9 \u65e5\u672c",
                "..", "~", "%41", "plain");
        List<Row> events = new ArrayList<>();
        for (int i = 0; i < ids.size(); i++) {
            events.add(ArchiveFixtures.event(ids.get(i), 1, DAY0 + i, (long) i, false));
            events.add(ArchiveFixtures.event(ids.get(i), 2, DAY0 + i, (long) i * 10, false));
        }
        DigestSource source = applied(spec, Storage.inMemory(), events, 2).snapshot().digestSource("archive");

        BoundDataset bound = BoundDataset.bind(spec, ArchiveFixtures.EVENT);
        Set<PartitionId> expected = new java.util.TreeSet<>();
        events.forEach(e -> expected.add(new PartitionId(bound.partition(e))));
        assertEquals(expected, source.digests().keySet());
        assertEquals(deliveries(spec, events).digests(), source.digests());
        DigestSourceContract.verify(source, ArchiveFixtures.EVENT);
    }

    @Test
    void digestSource_olderVersionKeepsItsOwnDigests() {
        DatasetSpec spec = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false);
        List<Row> first = ArchiveFixtures.randomEvents(new Random(8), 300, 100, 4);
        Archive<Row> archive = applied(spec, Storage.inMemory(), first, 1);
        long version = archive.snapshot().version();
        archive.apply(ArchiveFixtures.randomEvents(new Random(9), 300, 100, 4));

        DigestSource old = archive.snapshot(version).digestSource("archive v" + version);
        assertEquals(live(deliveries(spec, first).digests()), live(old.digests()));
        DigestSourceContract.verify(old, ArchiveFixtures.EVENT);
        assertEquals("archive v" + version, old.name());
        assertEquals(spec, old.spec());
    }

    private static final RowSchema EVOLVED = RowSchema.builder("event")
            .field("id", FieldType.string())
            .field("seq", FieldType.int64())
            .field("ts", FieldType.timestampMillis())
            .field("val", FieldType.int64().nullable())
            .field("clock", FieldType.map(FieldType.int64()))
            .field("deleted", FieldType.bool().nullable())
            .field("note", FieldType.string().nullable())
            .build();

    private static Row evolve(Row old) {
        return Row.of(EVOLVED, old.get("id"), old.get("seq"), old.get("ts"), old.get("val"), old.get("clock"),
                old.get("deleted"), null);
    }

    /** Reads chunks of the original schema as rows of {@link #EVOLVED} (the new field is null). */
    private static final class AddedFieldCodec implements PayloadCodec {
        private final PayloadCodec older = PayloadCodec.canonical(ArchiveFixtures.EVENT);
        private final PayloadCodec current = PayloadCodec.canonical(EVOLVED);

        @Override
        public String writerId() {
            return current.writerId();
        }

        @Override
        public byte[] encode(Row row) {
            return current.encode(row);
        }

        @Override
        public Row decode(String writerId, byte[] bytes) {
            return writerId.equals(older.writerId()) ? evolve(older.decode(writerId, bytes)) : current.decode(writerId, bytes);
        }
    }

    @Test
    void digestSource_partitionsWrittenUnderAnOlderSchemaAreDigestedAsTheCurrentOneReadsThem() {
        DatasetSpec spec = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false);
        Storage storage = Storage.inMemory();
        List<Row> first = ArchiveFixtures.randomEvents(new Random(12), 300, 100, 4);
        applied(spec, storage, first, 2);
        Archive<Row> evolved = Archive.builder(spec, RecordAccess.rows(EVOLVED)).storage(storage).codec(new AddedFieldCodec())
                .chunkTargetBytes(4096).parallelism(1).open();
        List<Row> all = new ArrayList<>();
        first.forEach(r -> all.add(evolve(r)));
        List<Row> second = new ArrayList<>();
        for (int i = 0; i < 20; i++) { // only hour 0 is rewritten under the new schema
            second.add(Row.of(EVOLVED, "n" + i, 1L, DAY0 + i, (long) i, Map.of("a", 1L), null, "new"));
        }
        evolved.apply(second);
        all.addAll(second);

        Snapshot<Row> snapshot = evolved.snapshot();
        DigestSource source = snapshot.digestSource("evolved archive");
        SortedMap<PartitionId, Digest> expected = live(RecordDigests.ofRows("deliveries", spec, EVOLVED, all::stream,
                RecordDigests.Mode.DELIVERIES).build().digests());

        assertEquals(expected, live(source.digests()));
        DigestSourceContract.verify(source, EVOLVED);
        // the snapshot's own partition digests are the same digests as read, not the stored ones of older rows
        assertEquals(0, snapshot.partitions().stream()
                .filter(p -> !p.digest().equals(source.digests().get(new PartitionId(p.values())))).count());
        assertTrue(evolved.verify().ok(), () -> evolved.verify().problems().toString());
    }

    // --- what each call reads ---

    private static final DatasetSpec HOURLY = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, true);

    /** 8 hours of 300 keys each, several chunks per hour at the fixtures' 4 KiB chunk target. */
    private static Archive<Row> hourly(InstrumentedStorage io) {
        List<Row> rows = new ArrayList<>();
        for (int h = 0; h < 8; h++) {
            for (int i = 0; i < 300; i++) {
                rows.add(ArchiveFixtures.event("h" + h + "-" + i, 1, DAY0 + h * HOUR + i, (long) i, false));
            }
        }
        rows.add(ArchiveFixtures.event("h2-7", 2, DAY0 + 2 * HOUR + 7, null, true)); // a tombstone
        return applied(HOURLY, io, rows, 3);
    }

    private static Map<String, Long> chunkBytesRead(InstrumentedStorage io) {
        Map<String, Long> out = new TreeMap<>();
        io.bytesRead.forEach((name, bytes) -> out.put(name, bytes.get()));
        return out;
    }

    @Test
    void digests_readNoFile() {
        InstrumentedStorage io = new InstrumentedStorage(new MemoryStorage());
        Archive<Row> archive = hourly(io);
        Snapshot<Row> snapshot = archive.snapshot();
        io.resetCounters();

        DigestSource source = snapshot.digestSource("archive");
        SortedMap<PartitionId, Digest> digests = source.digests();

        assertEquals(8, digests.size());
        assertEquals(Map.of(), chunkBytesRead(io), "digests() must come from the manifest alone");
        assertTrue(io.mutations.isEmpty(), io.mutations.toString());
        assertEquals(2399, digests.values().stream().mapToLong(Digest::keys).sum());
    }

    @Test
    void entries_readEveryChunkOfThatPartitionAndNothingElse() {
        InstrumentedStorage io = new InstrumentedStorage(new MemoryStorage());
        Archive<Row> archive = hourly(io);
        Snapshot<Row> snapshot = archive.snapshot();
        PartitionInfo hour = snapshot.partitions().get(2);
        assertTrue(hour.chunkFiles() > 1, "the test needs several chunks in the partition, got " + hour.chunkFiles());
        DigestSource source = snapshot.digestSource("archive");
        io.resetCounters();

        long[] count = {0};
        source.entries(new PartitionId(hour.values()), (key, hash) -> count[0]++);

        assertEquals(299, count[0], "300 keys, one deleted");
        Map<String, Long> read = chunkBytesRead(io);
        assertEquals(hour.chunkFiles(), read.size(), read.toString());
        String directory = ManifestFormat.chunkDirectory(hour.name());
        assertTrue(read.keySet().stream().allMatch(n -> n.startsWith(directory)), read.toString());
        assertEquals(hour.bytes(), read.values().stream().mapToLong(Long::longValue).sum());

        // drill-down asks twice for the same partition: the second pass is served from the kept entries
        io.resetCounters();
        long[] again = {0};
        source.entries(new PartitionId(hour.values()), (key, hash) -> again[0]++);
        assertEquals(299, again[0]);
        assertEquals(Map.of(), chunkBytesRead(io));
    }

    @Test
    void versions_readOnlyTheChunkThatHoldsTheKey() {
        InstrumentedStorage io = new InstrumentedStorage(new MemoryStorage());
        Archive<Row> archive = hourly(io);
        Snapshot<Row> snapshot = archive.snapshot();
        PartitionInfo hour = snapshot.partitions().get(5);
        DigestSource source = snapshot.digestSource("archive");
        Row stored = ArchiveFixtures.event("h5-123", 1, DAY0 + 5 * HOUR + 123, 123L, false);
        byte[] key = BoundDataset.bind(HOURLY, ArchiveFixtures.EVENT).key(stored);
        io.resetCounters();

        Map<ByteBuffer, List<Row>> found = source.versions(new PartitionId(hour.values()), Set.of(ByteBuffer.wrap(key)));

        assertEquals(Map.of(ByteBuffer.wrap(key), List.of(stored)), found);
        Map<String, Long> read = chunkBytesRead(io);
        String directory = ManifestFormat.chunkDirectory(hour.name());
        assertTrue(read.keySet().stream().allMatch(n -> n.startsWith(directory)), read.toString());
        long wholeChunks = read.entrySet().stream().filter(e -> e.getValue() >= io.size(e.getKey())).count();
        assertEquals(1, wholeChunks, "only the chunk whose key-hash index holds the key is read whole: " + read);
    }

    @Test
    void versions_deletedUnknownAndForeignKeysAreAbsent() {
        Archive<Row> archive = hourly(new InstrumentedStorage(new MemoryStorage()));
        DigestSource source = archive.snapshot().digestSource("archive");
        BoundDataset bound = BoundDataset.bind(HOURLY, ArchiveFixtures.EVENT);
        ByteBuffer deleted = ByteBuffer.wrap(bound.key(ArchiveFixtures.event("h2-7", 1, 0, null, false)));
        ByteBuffer unknown = ByteBuffer.wrap(bound.key(ArchiveFixtures.event("nobody", 1, 0, null, false)));
        ByteBuffer elsewhere = ByteBuffer.wrap(bound.key(ArchiveFixtures.event("h3-1", 1, 0, null, false)));
        PartitionId hour2 = source.digests().keySet().stream().toList().get(2);

        assertEquals(Map.of(), source.versions(hour2, Set.of(deleted, unknown, elsewhere)));
        assertEquals(Map.of(), source.versions(new PartitionId(List.of("1999-01-01T00")), Set.of(elsewhere)));
        long[] none = {0};
        source.entries(new PartitionId(List.of("1999-01-01T00")), (k, h) -> none[0]++);
        assertEquals(0, none[0]);
    }

    // --- against a table in an embedded SQL engine ---

    private static final RowSchema READING = RowSchema.builder("reading")
            .field("id", FieldType.string())
            .field("seq", FieldType.int64())
            .field("ts", FieldType.timestampMillis())
            .field("amount", FieldType.decimal(12, 2))
            .build();

    private static final DatasetSpec READINGS = DatasetSpec.fromJson("""
            {"key": ["id"], "order": ["ts"], "partition": {"field": "ts", "unit": "day"},
             "merge": {"policy": "last-writer", "version": "seq"},
             "checks": [{"aggregate": "sum", "field": "amount"}, {"aggregate": "max", "field": "seq"}]}""", "readings spec");

    private static final String QUERY = "select id, seq, ts_millis, amount from readings";

    /**
     * The required test of the reconciliation issue, against H2 Database Engine (com.h2database:h2 from Maven
     * Central): an archive and an H2 table loaded with the same records agree, and the SQL engine's own
     * sum(amount) equals the archive's sum check; after one row is changed in the table, drill-down names that key
     * with both versions.
     */
    @Test
    void compare_archiveAgainstH2TableAgreesThenNamesTheChangedRow() throws SQLException {
        Random random = new Random(17);
        List<Row> deliveries = new ArrayList<>();
        Map<String, Row> latest = new TreeMap<>();
        for (int k = 0; k < 400; k++) {
            String id = "r" + k;
            int versions = 1 + random.nextInt(3);
            for (long seq = 1; seq <= versions; seq++) {
                // versions of one key may fall on different days, so keys move between partitions
                Row r = Row.of(READING, id, seq, DAY0 + random.nextInt(5 * 24) * HOUR,
                        BigDecimal.valueOf(random.nextInt(1_000_000), 2));
                deliveries.add(r);
                if (random.nextInt(4) == 0) {
                    deliveries.add(r);
                }
                latest.put(id, r);
            }
        }
        Collections.shuffle(deliveries, random);
        Archive<Row> archive = Archive.builder(READINGS, RecordAccess.rows(READING)).storage(Storage.inMemory())
                .chunkTargetBytes(4096).parallelism(1).open();
        for (int from = 0; from < deliveries.size(); from += 250) {
            archive.apply(deliveries.subList(from, Math.min(deliveries.size(), from + 250)));
        }

        try (Connection db = DriverManager.getConnection("jdbc:h2:mem:")) {
            try (Statement s = db.createStatement()) {
                s.execute("create table readings (id varchar primary key, seq bigint not null, ts_millis bigint not null, "
                        + "amount decimal(12, 2) not null)");
            }
            try (PreparedStatement p = db.prepareStatement("insert into readings values (?, ?, ?, ?)")) {
                for (Row r : latest.values()) {
                    p.setString(1, (String) r.get("id"));
                    p.setLong(2, (Long) r.get("seq"));
                    p.setLong(3, (Long) r.get("ts"));
                    p.setBigDecimal(4, (BigDecimal) r.get("amount"));
                    p.addBatch();
                }
                p.executeBatch();
            }
            DigestSource left = archive.snapshot().digestSource("archive");

            ReconciliationReport agreed = Reconciliation.defaults().compare(left, table(db));
            assertEquals("agree", agreed.status(), agreed.summary());
            assertEquals(400, agreed.leftTotal().keys());
            assertEquals(5, agreed.partitions().size());
            try (Statement s = db.createStatement(); var rs = s.executeQuery("select sum(amount), max(seq) from readings")) {
                rs.next();
                assertEquals(0, rs.getBigDecimal(1).compareTo(agreed.leftTotal().aggregates().get(0)));
                assertEquals(0, BigDecimal.valueOf(rs.getLong(2)).compareTo(agreed.leftTotal().aggregates().get(1)));
            }

            String changed = "r" + random.nextInt(400);
            try (Statement s = db.createStatement()) {
                assertEquals(1, s.executeUpdate("update readings set amount = amount + 0.01 where id = '" + changed + "'"));
            }
            ReconciliationReport report = Reconciliation.defaults().compare(left, table(db));

            assertEquals("disagree", report.status());
            List<PartitionResult> differing = report.partitions().stream().filter(p -> p.verdict() != Verdict.AGREE).toList();
            assertEquals(1, differing.size(), report.summary());
            PartitionResult p = differing.get(0);
            Row before = latest.get(changed);
            assertEquals(new PartitionId(BoundDataset.bind(READINGS, READING).partition(before)), p.partition());
            assertEquals(Verdict.CONTENT_DIFFERS, p.verdict());
            assertEquals("sketch", p.drillDown().method());
            assertEquals(0, p.drillDown().missingLeftCount() + p.drillDown().missingRightCount());
            List<KeyDifference> keys = p.drillDown().contentDiffers();
            assertEquals(1, keys.size(), report.summary());
            assertEquals(Map.of("id", changed), keys.get(0).key());
            assertEquals(List.of(before), keys.get(0).left());
            assertEquals(List.of(before.with("amount", ((BigDecimal) before.get("amount")).add(new BigDecimal("0.01")))),
                    keys.get(0).right());
            assertTrue(report.summary().contains(changed), report.summary());
        }
    }

    private static DigestSource table(Connection db) {
        return JdbcDigests.query("h2 readings", READINGS, READING, db, QUERY,
                rs -> Row.of(READING, rs.getString(1), rs.getLong(2), rs.getLong(3), rs.getBigDecimal(4)),
                RecordDigests.Mode.STORE).build();
    }
}
