package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.onefold.BatchEngine;
import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.record.Row;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericRecord;

/** Records of generated schemas survive every path through the adapter unchanged. */
class AvroRoundTripProperties {

    private record Sample(Schema schema, AvroRecordAccess access, List<GenericRecord> records) {
        List<Row> rows() {
            return records.stream().map(access::toRow).toList();
        }
    }

    private static Sample sample(long seed, int count) {
        GeneratedSchemas gen = new GeneratedSchemas(seed);
        Schema schema = gen.keyedRecord();
        List<GenericRecord> records = new ArrayList<>();
        for (int i = 0; i < count; i++) {
            records.add(gen.record(schema, i, i));
        }
        return new Sample(schema, AvroRecordAccess.of(schema), records);
    }

    @Property(tries = 200)
    void codec_roundTripsGeneratedRecords(@ForAll long seed) {
        Sample s = sample(seed, 5);
        AvroPayloadCodec codec = AvroPayloadCodec.of(s.schema());
        for (Row row : s.rows()) {
            assertEquals(row, codec.decode(codec.writerId(), codec.encode(row)));
        }
        // a schema's JSON text parses back to the same fingerprint
        assertEquals(codec.writerId(), AvroPayloadCodec.writerIdOf(new Schema.Parser().parse(s.schema().toString())));
    }

    @Property(tries = 300)
    void jsonLines_roundTripGeneratedRecords(@ForAll long seed) {
        Sample s = sample(seed, 5);
        JsonLines lines = JsonLines.of(s.schema());
        for (GenericRecord g : s.records()) {
            String line = lines.write(g);
            assertEquals(s.access().toRow(g), s.access().toRow(lines.parse(line, "line")), line);
        }
    }

    @Property(tries = 100)
    void containerFile_roundTripsGeneratedRecords(@ForAll long seed, @ForAll @IntRange(min = 0, max = 3) int codecIndex) {
        Sample s = sample(seed, 8);
        ContainerFiles.Compression compression = ContainerFiles.Compression.values()[codecIndex];
        Path file = tempFile();
        try {
            try (ContainerFiles.Writer w = ContainerFiles.create(file, s.schema(), compression)) {
                s.records().forEach(w);
            }
            List<Row> back = new ArrayList<>();
            try (ContainerFiles.Reader r = ContainerFiles.open(file, s.schema())) {
                r.forEachRemaining(g -> back.add(s.access().toRow(g)));
            }
            assertEquals(s.rows(), back);
        } finally {
            delete(file);
        }
    }

    @Property(tries = 100)
    void engine_distinctKeysComeBackUnchangedInKeyOrder(@ForAll long seed) {
        Sample s = sample(seed, 12);
        List<GenericRecord> shuffled = new ArrayList<>(s.records());
        Collections.shuffle(shuffled, new Random(seed));
        DatasetSpec spec = DatasetSpec.builder().key("id").lastWriter("seq").build();
        List<GenericRecord> out = AvroDataset.of(s.schema(), spec).engine().parallel(false).build().dedupe(shuffled).survivors();
        assertEquals(s.rows(), out.stream().map(s.access()::toRow).toList());
    }

    @Property(tries = 300)
    void decode_randomBodies_failCleanlyOrDecode(@ForAll long seed, @ForAll byte[] body) {
        Sample s = sample(seed, 1);
        AvroPayloadCodec codec = AvroPayloadCodec.of(s.schema(), SchemaStore.inMemory(), new DecodeLimits(64, 64, 64, 16));
        byte[] valid = codec.encode(s.rows().get(0));
        byte[] payload = new byte[AvroPayloadCodec.HEADER_BYTES + body.length];
        System.arraycopy(valid, 0, payload, 0, AvroPayloadCodec.HEADER_BYTES);
        System.arraycopy(body, 0, payload, AvroPayloadCodec.HEADER_BYTES, body.length);
        try {
            Row r = codec.decode(codec.writerId(), payload);
            assertEquals(r, codec.decode(codec.writerId(), codec.encode(r)));
        } catch (OnefoldException e) {
            // the only allowed failure: a clear, typed error (never an OutOfMemoryError or a raw Avro exception)
            assertEquals(true, e.kind() == OnefoldException.Kind.CORRUPT, e.getMessage());
        }
    }

    private static Path tempFile() {
        try {
            return Files.createTempFile("onefold-avro-", ".avro");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static void delete(Path file) {
        try {
            Files.deleteIfExists(file);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
