package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.archive.Archive;
import dev.onefold.archive.Snapshot;
import dev.onefold.record.Row;
import dev.onefold.spi.Storage;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;
import org.apache.avro.Schema;
import org.apache.avro.file.DataFileReader;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

/**
 * The archive with the Avro payload codec end to end: chunks written under schema version 1 are read as
 * version 2 after a compatible change (added field with default, removed field, int promoted to long; Avro
 * specification, "Schema Resolution"), new batches apply on top, a spec change is still refused, and the content
 * exports to a container file that Avro's own {@link DataFileReader} reads.
 */
class AvroArchiveTest {
    @TempDir
    Path dir;

    /** Partitioned by the hour of "at", so batches touch some partitions and leave others as version 1 wrote them. */
    static final DatasetSpec SPEC = DatasetSpec.fromJson("""
            {"key": ["id"], "order": ["at"], "partition": {"field": "at", "unit": "hour"},
             "merge": {"policy": "last-writer", "version": "seq"},
             "checks": [{"aggregate": "sum", "field": "count"}]}""", "evolution spec");

    static final Schema V1 = TestSchemas.parse("""
            {"type": "record", "name": "Reading", "namespace": "t", "fields": [
              {"name": "id", "type": "string"}, {"name": "seq", "type": "long"},
              {"name": "at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
              {"name": "count", "type": "int"}, {"name": "old", "type": "string"}]}""");

    /** Drops "old", widens "count" to long, adds "added" with a default. */
    static final Schema V2 = TestSchemas.parse("""
            {"type": "record", "name": "Reading", "namespace": "t", "fields": [
              {"name": "id", "type": "string"}, {"name": "seq", "type": "long"},
              {"name": "at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
              {"name": "count", "type": "long"},
              {"name": "added", "type": "string", "default": "none"}]}""");

    /** 2024-02-29T00:00Z in epoch millis (java.time, REFERENCES.md section 7 table). */
    static final long DAY0 = 1_709_164_800_000L;
    static final long HOUR = 3_600_000L;

    static GenericRecord v1(String id, long seq, int hour, int count) {
        GenericRecord r = new GenericData.Record(V1);
        r.put("id", id);
        r.put("seq", seq);
        r.put("at", DAY0 + hour * HOUR + seq);
        r.put("count", count);
        r.put("old", "old-" + id);
        return r;
    }

    static GenericRecord v2(String id, long seq, int hour, long count, String added) {
        GenericRecord r = new GenericData.Record(V2);
        r.put("id", id);
        r.put("seq", seq);
        r.put("at", DAY0 + hour * HOUR + seq);
        r.put("count", count);
        r.put("added", added);
        return r;
    }

    /** A version 1 record as version 2 reads it: "old" skipped, "count" widened, "added" defaulted. */
    static GenericRecord v1AsV2(GenericRecord r) {
        return v2(r.get("id").toString(), (Long) r.get("seq"), (int) (((Long) r.get("at") - DAY0) / HOUR),
                (Integer) r.get("count"), "none");
    }

    /** An archive of the dataset at the newest of {@code versions}, with that version's codec. */
    static Archive<GenericRecord> archive(SchemaVersions versions, Storage storage) {
        AvroDataset d = versions.dataset();
        return Archive.builder(d.spec(), d.access()).storage(storage).codec(versions.codec(DecodeLimits.DEFAULT))
                .chunkTargetBytes(1024).parallelism(1).open();
    }

    static List<Row> rows(Snapshot<GenericRecord> s, AvroRecordAccess access) {
        try (Stream<GenericRecord> records = s.rows()) {
            return records.map(access::toRow).toList();
        }
    }

    /** The batch engine's survivors at version 2 (the model). */
    static List<Row> model(List<GenericRecord> allAsV2) {
        AvroDataset d = AvroDataset.of(V2, SPEC);
        return d.engine().parallel(false).build().dedupe(allAsV2).survivors().stream().map(d.access()::toRow).toList();
    }

    private static List<GenericRecord> firstBatch() {
        List<GenericRecord> out = new ArrayList<>();
        for (int i = 0; i < 40; i++) {
            out.add(v1("k" + i % 25, i / 25 + 1, i % 4, i * 7 - 100));
        }
        return out;
    }

    private static List<GenericRecord> secondBatch() {
        // keys of hours 0 and 1 only, some newer (they replace), some older (superseded), some new keys
        List<GenericRecord> out = new ArrayList<>();
        for (int i = 0; i < 20; i++) {
            int key = i % 2 == 0 ? i : 30 + i;
            out.add(v2("k" + key, i % 3 == 0 ? 0 : 5, key % 2, 5_000_000_000L + i, "a" + i));
        }
        return out;
    }

    // ---- schema evolution

    /** The first batch applied under version 1, then the archive reopened under version 2. */
    private static Archive<GenericRecord> evolvedArchive() {
        Storage storage = Storage.inMemory();
        SchemaVersions versions = SchemaVersions.first(V1, SPEC);
        archive(versions, storage).apply(firstBatch());
        return archive(versions.register(V2), storage);
    }

    @Test
    void reopenWithV2_readsV1ChunksAsV2() {
        Archive<GenericRecord> evolved = evolvedArchive();
        List<GenericRecord> asV2 = firstBatch().stream().map(AvroArchiveTest::v1AsV2).toList();
        assertEquals(model(asV2), rows(evolved.snapshot(), AvroRecordAccess.of(V2)));
        GenericRecord read = evolved.snapshot().lookup(v2("k3", 0, 0, 0, "")).get(0);
        assertEquals(V2, read.getSchema());
        assertEquals(96L, read.get("count"), "k3's newest version (seq 2, count 28 * 7 - 100); int promoted to long (Avro specification, Schema Resolution)");
        assertEquals("none", read.get("added").toString(), "added field takes its default");
        assertTrue(evolved.verify().ok(), () -> evolved.verify().problems().toString());
    }

    @Test
    void applyV2OnTopOfV1_equalsAllRecordsAsV2() {
        Archive<GenericRecord> evolved = evolvedArchive();
        evolved.apply(secondBatch());

        List<GenericRecord> all = new ArrayList<>(firstBatch().stream().map(AvroArchiveTest::v1AsV2).toList());
        all.addAll(secondBatch());
        assertEquals(model(all), rows(evolved.snapshot(), AvroRecordAccess.of(V2)));
        Archive<GenericRecord> allV2 = archive(SchemaVersions.first(V2, SPEC), Storage.inMemory());
        allV2.apply(all);
        assertEquals(allV2.snapshot().digest(), evolved.snapshot().digest(),
                "an archive evolved from version 1 and one written under version 2 hold the same content");
        assertTrue(evolved.verify().ok(), () -> evolved.verify().problems().toString());
    }

    @Test
    void reopenWithAnotherSpec_isRefused() {
        Storage storage = Storage.inMemory();
        archive(SchemaVersions.first(V1, SPEC), storage).apply(firstBatch());
        DatasetSpec daily = DatasetSpec.fromJson(SPEC.toJson().replace("\"hour\"", "\"day\""), "daily spec");
        Archive<GenericRecord> other = archive(SchemaVersions.first(V2, daily), storage);
        OnefoldException e = assertThrows(OnefoldException.class, other::snapshot);
        assertEquals(OnefoldException.Kind.USAGE, e.kind());
        assertTrue(e.getMessage().contains("different dataset spec"), e.getMessage());
        assertThrows(OnefoldException.class, () -> other.apply(secondBatch()), "nothing is written under the other spec");
    }

    // ---- export

    @ParameterizedTest
    @EnumSource(ContainerFiles.Compression.class)
    void export_containerFileReadByAvrosOwnReader(ContainerFiles.Compression compression) throws Exception {
        Archive<GenericRecord> evolved = evolvedArchive();
        evolved.apply(secondBatch());

        Path file = dir.resolve("export-" + compression + ".avro");
        try (Stream<GenericRecord> s = evolved.snapshot().rows();
                ContainerFiles.Writer w = ContainerFiles.create(file, V2, compression)) {
            s.forEach(w);
        }
        List<Row> read = new ArrayList<>();
        AvroRecordAccess access = AvroRecordAccess.of(V2);
        try (DataFileReader<GenericRecord> r = new DataFileReader<>(file.toFile(), new GenericDatumReader<>())) {
            assertEquals(compression.avroName(), r.getMetaString("avro.codec"));
            assertEquals(V2, r.getSchema());
            r.forEach(g -> read.add(access.toRow(g)));
        }
        assertEquals(rows(evolved.snapshot(), access), read);
        assertTrue(evolved.snapshot().globallyOrdered(), "hour partitions of the leading order field");
    }
}
