package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.BatchEngine;
import dev.onefold.BatchReport;
import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.record.Row;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.apache.avro.file.DataFileReader;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

class ContainerFilesTest {
    @TempDir
    Path dir;

    private static List<GenericRecord> records(int n) {
        List<GenericRecord> out = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            out.add(TestSchemas.wide("k" + i, i, i));
        }
        return out;
    }

    private static List<Row> rows(List<GenericRecord> records) {
        AvroRecordAccess a = AvroRecordAccess.of(TestSchemas.WIDE);
        return records.stream().map(a::toRow).toList();
    }

    @ParameterizedTest
    @EnumSource(ContainerFiles.Compression.class)
    void writeThenRead_everyCompression_roundTrips(ContainerFiles.Compression compression) {
        assertTrue(compression.isAvailable(), compression + " should be available: its library is a dependency of the build");
        Path file = dir.resolve("out-" + compression + ".avro");
        List<GenericRecord> in = records(300);
        try (ContainerFiles.Writer w = ContainerFiles.create(file, TestSchemas.WIDE, compression)) {
            in.forEach(w);
            assertEquals(300, w.count());
        }
        List<GenericRecord> out = new ArrayList<>();
        try (ContainerFiles.Reader r = ContainerFiles.open(file, TestSchemas.WIDE)) {
            assertEquals(compression.avroName(), r.codecName());
            r.forEachRemaining(out::add);
        }
        assertEquals(rows(in), rows(out));
    }

    @Test
    void write_fileIsReadableByAvrosOwnReader() throws Exception {
        Path file = dir.resolve("plain.avro");
        try (ContainerFiles.Writer w = ContainerFiles.create(file, TestSchemas.WIDE, ContainerFiles.Compression.DEFLATE)) {
            records(10).forEach(w);
        }
        List<GenericRecord> out = new ArrayList<>();
        try (DataFileReader<GenericRecord> r = new DataFileReader<>(file.toFile(), new GenericDatumReader<>())) {
            r.forEach(out::add);
            assertEquals("deflate", r.getMetaString("avro.codec"));
        }
        assertEquals(rows(records(10)), rows(out));
        assertEquals(TestSchemas.WIDE, ContainerFiles.schemaOf(file));
    }

    @Test
    void open_olderFile_readsAsNewerSchema() {
        Path file = dir.resolve("v1.avro");
        try (ContainerFiles.Writer w = ContainerFiles.create(file, Evolution.V1, ContainerFiles.Compression.NULL)) {
            w.accept(Evolution.v1("a", 1, 5));
        }
        try (ContainerFiles.Reader r = ContainerFiles.open(file, Evolution.V2)) {
            GenericRecord g = r.next();
            assertEquals(AvroRecordAccess.of(Evolution.V2).toRow(Evolution.v1AsV2(Evolution.v1("a", 1, 5))),
                    AvroRecordAccess.of(Evolution.V2).toRow(g));
            assertTrue(!r.hasNext());
        }
    }

    @Test
    void open_incompatibleFile_namesFileAndReason() {
        Path file = dir.resolve("v2.avro");
        try (ContainerFiles.Writer w = ContainerFiles.create(file, Evolution.V2, ContainerFiles.Compression.NULL)) {
            w.accept(Evolution.v2("a", 1, 5, "x"));
        }
        OnefoldException e = assertThrows(OnefoldException.class, () -> ContainerFiles.open(file, Evolution.V1));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
        assertTrue(e.getMessage().contains(file.toString()) && e.getMessage().contains("old"), e.getMessage());
    }

    @Test
    void open_notAContainerFile_isCorruptNamingFile() throws Exception {
        Path file = dir.resolve("junk.avro");
        Files.write(file, new byte[] {'O', 'b', 'j', 1, 9, 9, 9});
        OnefoldException e = assertThrows(OnefoldException.class, () -> ContainerFiles.open(file, TestSchemas.WIDE));
        assertEquals(OnefoldException.Kind.CORRUPT, e.kind());
        assertTrue(e.getMessage().contains("junk.avro"), e.getMessage());
    }

    @Test
    void next_truncatedBlock_isCorruptNamingFileAndRecord() throws Exception {
        Path file = dir.resolve("whole.avro");
        try (ContainerFiles.Writer w = ContainerFiles.create(file, TestSchemas.WIDE, ContainerFiles.Compression.NULL)) {
            records(50).forEach(w);
        }
        byte[] bytes = Files.readAllBytes(file);
        Path cut = dir.resolve("cut.avro");
        Files.write(cut, java.util.Arrays.copyOf(bytes, bytes.length - 40));
        OnefoldException e = assertThrows(OnefoldException.class, () -> {
            try (ContainerFiles.Reader r = ContainerFiles.open(cut, TestSchemas.WIDE)) {
                r.forEachRemaining(g -> { });
            }
        });
        assertEquals(OnefoldException.Kind.CORRUPT, e.kind());
        assertTrue(e.getMessage().contains("cut.avro"), e.getMessage());
    }

    @Test
    void accept_nonConformingRecord_namesFileRecordAndField() {
        Path file = dir.resolve("bad.avro");
        try (ContainerFiles.Writer w = ContainerFiles.create(file, TestSchemas.WIDE, ContainerFiles.Compression.NULL)) {
            w.accept(TestSchemas.wide("a", 1, 1));
            GenericRecord bad = TestSchemas.wide("b", 1, 1);
            bad.put("seq", "x");
            OnefoldException e = assertThrows(OnefoldException.class, () -> w.accept(bad));
            assertTrue(e.getMessage().contains("bad.avro") && e.getMessage().contains("record 1") && e.getMessage().contains("'seq'"),
                    e.getMessage());
        }
    }

    @Test
    void importDedupeExport_throughTheEngine() {
        Path in = dir.resolve("in.avro");
        try (ContainerFiles.Writer w = ContainerFiles.create(in, TestSchemas.WIDE, ContainerFiles.Compression.ZSTD)) {
            for (int i = 0; i < 100; i++) {
                w.accept(TestSchemas.wide("k" + (i % 7), i, i));
            }
        }
        DatasetSpec spec = DatasetSpec.builder().key("id").lastWriter("seq").build();
        BatchEngine<GenericRecord> engine = AvroDataset.of(TestSchemas.WIDE, spec).engine().build();
        Path out = dir.resolve("out.avro");
        BatchReport report;
        try (ContainerFiles.Reader r = ContainerFiles.open(in, TestSchemas.WIDE);
                ContainerFiles.Writer w = ContainerFiles.create(out, TestSchemas.WIDE, ContainerFiles.Compression.SNAPPY)) {
            report = engine.dedupe(r, in.toString(), w, rej -> { throw new AssertionError(rej.toString()); });
        }
        assertEquals(100, report.in());
        assertEquals(7, report.out());
        List<GenericRecord> survivors = new ArrayList<>();
        try (ContainerFiles.Reader r = ContainerFiles.open(out, TestSchemas.WIDE)) {
            r.forEachRemaining(survivors::add);
        }
        // the last delivery of key k (i mod 7 = k) is the highest seq: 98, 99, 93, 94, 95, 96, 97
        assertEquals(List.of(98L, 99L, 93L, 94L, 95L, 96L, 97L), survivors.stream().map(g -> (Long) g.get("seq")).toList());
    }

    @Test
    void fromName_acceptsShortAndAvroNames() {
        assertEquals(ContainerFiles.Compression.ZSTD, ContainerFiles.Compression.fromName("zstd"));
        assertEquals(ContainerFiles.Compression.ZSTD, ContainerFiles.Compression.fromName("zstandard"));
        assertEquals(ContainerFiles.Compression.DEFLATE, ContainerFiles.Compression.fromName("DEFLATE"));
        assertThrows(OnefoldException.class, () -> ContainerFiles.Compression.fromName("lz4"));
    }
}
