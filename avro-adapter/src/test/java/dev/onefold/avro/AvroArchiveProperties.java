package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.archive.Archive;
import dev.onefold.archive.Snapshot;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import dev.onefold.spi.Storage;
import java.util.ArrayList;
import java.util.Collections;
import java.util.Comparator;
import java.util.List;
import java.util.Random;
import java.util.function.Function;
import java.util.stream.Stream;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.constraints.IntRange;
import org.apache.avro.generic.GenericRecord;

/**
 * The archive's convergence promise re-run with Avro generic records stored through the Avro payload codec
 * (STYLE.md habit 12: the incremental path equals the reference path): deliveries shuffled, duplicated, split
 * into batches and replayed give the same archive content as one apply of their union, and the batch engine's
 * records; and across a schema change, version 1 and version 2 payloads applied in batches before and after the
 * archive is reopened under version 2 give the content of an archive that only ever saw version 2.
 */
class AvroArchiveProperties {
    private static final String HOURLY = "\"partition\": {\"field\": \"at\", \"unit\": \"hour\"}, ";
    private static final AvroRecordAccess ACCESS = AvroRecordAccess.of(AvroConvergenceProperties.SCHEMA);

    /** The adapter's convergence specs, partitioned by the hour of "at" (which field-wise "max" moves). */
    @Provide
    Arbitrary<String> policies() {
        return Arbitraries.of(AvroConvergenceProperties.LAST_WRITER, AvroConvergenceProperties.KEEP_ALL,
                AvroConvergenceProperties.PICK, AvroConvergenceProperties.FIELD_WISE).map(s -> s.replaceFirst("\\{", "{" + HOURLY));
    }

    private static <R> Archive<R> archive(DatasetSpec spec, RecordAccess<R> access, AvroPayloadCodec codec) {
        return Archive.builder(spec, access).storage(Storage.inMemory()).codec(codec).chunkTargetBytes(1024)
                .parallelism(1).open();
    }

    /** Applies deliveries in {@code batches} random consecutive slices, then replays a random prefix. */
    private static <R> void applyInBatches(Archive<R> archive, List<R> deliveries, int batches, Random random) {
        int from = 0;
        for (int b = 0; b < batches; b++) {
            int to = b == batches - 1 ? deliveries.size() : from + random.nextInt(deliveries.size() - from + 1);
            archive.apply(deliveries.subList(from, to));
            from = to;
        }
        archive.apply(deliveries.subList(0, random.nextInt(deliveries.size() + 1)));
    }

    private static <R> List<Row> rows(Snapshot<R> snapshot, Function<R, Row> toRow) {
        try (Stream<R> s = snapshot.rows()) {
            return s.map(toRow).toList();
        }
    }

    private static List<List<Object>> partitions(Snapshot<?> snapshot) {
        return snapshot.partitions().stream().map(p -> List.<Object>of(p.values(), p.digest(), p.entries())).toList();
    }

    private static List<Row> sorted(List<Row> rows) {
        List<Row> out = new ArrayList<>(rows);
        out.sort(Comparator.comparing(Row::toString));
        return out;
    }

    @Property(tries = 150)
    void applyInBatches_equalsApplyOfUnionAndTheBatchEngine(@ForAll("policies") String specJson, @ForAll long seed,
            @ForAll @IntRange(min = 1, max = 5) int batches) {
        DatasetSpec spec = DatasetSpec.fromJson(specJson, "spec");
        Random random = new Random(seed);
        List<GenericRecord> records = AvroConvergenceProperties.records(random, 1 + random.nextInt(25));
        List<GenericRecord> deliveries = AvroConvergenceProperties.deliveries(random, records);
        AvroPayloadCodec codec = AvroPayloadCodec.of(AvroConvergenceProperties.SCHEMA);

        Archive<GenericRecord> incremental = archive(spec, ACCESS, codec);
        applyInBatches(incremental, deliveries, batches, random);
        Archive<GenericRecord> once = archive(spec, ACCESS, codec);
        once.apply(records);

        assertEquals(rows(once.snapshot(), ACCESS::toRow), rows(incremental.snapshot(), ACCESS::toRow));
        assertEquals(partitions(once.snapshot()), partitions(incremental.snapshot()));
        List<Row> model = AvroDataset.of(AvroConvergenceProperties.SCHEMA, spec).engine().parallel(false).build()
                .dedupe(records).survivors().stream().map(ACCESS::toRow).toList();
        // siblings and keys without an order field are ordered within their partition only
        assertEquals(sorted(model), sorted(rows(incremental.snapshot(), ACCESS::toRow)));
        assertTrue(incremental.verify().ok(), () -> incremental.verify().problems().toString());
    }

    @Property(tries = 150)
    void evolution_v1AndV2PayloadsAcrossReopen_equalAllAsV2(@ForAll long seed, @ForAll @IntRange(min = 1, max = 4) int batches) {
        Random random = new Random(seed);
        SchemaVersions v1 = SchemaVersions.first(AvroArchiveTest.V1, AvroArchiveTest.SPEC);
        SchemaVersions v2 = v1.register(AvroArchiveTest.V2);
        AvroPayloadCodec v1Codec = v1.codec(DecodeLimits.DEFAULT);
        AvroPayloadCodec v2Codec = v2.codec(DecodeLimits.DEFAULT);
        List<byte[]> before = new ArrayList<>();
        List<byte[]> after = new ArrayList<>();
        List<GenericRecord> allAsV2 = new ArrayList<>();
        int n = 1 + random.nextInt(30);
        for (int i = 0; i < n; i++) {
            String id = "k" + random.nextInt(8);
            long seq = random.nextInt(6);
            int hour = random.nextInt(4);
            boolean old = random.nextInt(3) > 0;
            if (old) {
                GenericRecord r = AvroArchiveTest.v1(id, seq, hour, random.nextInt());
                byte[] payload = v1Codec.encodeRecord(r);
                (random.nextBoolean() ? before : after).add(payload); // old producers keep sending after the change
                allAsV2.add(AvroArchiveTest.v1AsV2(r));
            } else {
                GenericRecord r = AvroArchiveTest.v2(id, seq, hour, random.nextLong(), "a" + random.nextInt(3));
                after.add(v2Codec.encodeRecord(r));
                allAsV2.add(r);
            }
        }
        after.addAll(before.subList(0, random.nextInt(before.size() + 1))); // replays of what was applied before
        Collections.shuffle(before, random);
        Collections.shuffle(after, random);

        Storage storage = Storage.inMemory();
        Archive<byte[]> first = Archive.builder(v1.spec(), v1Codec.payloadAccess()).storage(storage).codec(v1Codec)
                .chunkTargetBytes(1024).parallelism(1).open();
        if (!before.isEmpty()) {
            applyInBatches(first, before, batches, random);
        }
        Archive<byte[]> evolved = Archive.builder(v2.spec(), v2Codec.payloadAccess()).storage(storage).codec(v2Codec)
                .chunkTargetBytes(1024).parallelism(1).open();
        if (!after.isEmpty()) {
            applyInBatches(evolved, after, batches, random);
        }
        AvroRecordAccess v2Access = AvroRecordAccess.of(AvroArchiveTest.V2);
        Archive<GenericRecord> onlyV2 = archive(v2.spec(), v2Access, v2Codec);
        onlyV2.apply(allAsV2);

        assertEquals(rows(onlyV2.snapshot(), v2Access::toRow),
                rows(evolved.snapshot(), p -> v2Codec.decode(v2Codec.writerId(), p)));
        assertEquals(partitions(onlyV2.snapshot()), partitions(evolved.snapshot()));
        assertEquals(onlyV2.snapshot().digest(), evolved.snapshot().digest());
        assertTrue(evolved.verify().ok(), () -> evolved.verify().problems().toString());
    }
}
