package dev.onefold.benchmarks.avro;

import dev.onefold.DatasetSpec;
import dev.onefold.archive.ApplyPlan;
import dev.onefold.archive.Archive;
import dev.onefold.archive.PartitionResult;
import dev.onefold.archive.PartitionTask;
import dev.onefold.archive.SweepRules;
import dev.onefold.avro.AvroDataset;
import dev.onefold.avro.AvroPayloadCodec;
import dev.onefold.record.Row;
import dev.onefold.spi.Storage;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericDatumWriter;
import org.apache.avro.generic.GenericRecord;
import org.apache.avro.io.BinaryDecoder;
import org.apache.avro.io.BinaryEncoder;
import org.apache.avro.io.DecoderFactory;
import org.apache.avro.io.EncoderFactory;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OperationsPerInvocation;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.TearDown;
import org.openjdk.jmh.annotations.Warmup;

/**
 * Question 3 of the benchmark suite: what does the archive's rewrite of a touched partition cost per record
 * with the Avro payload codec (decode every stored record through the codec, merge the batch in, encode every
 * record again, build chunks with their key-hash index and digest) next to raw Avro binary decode plus encode of
 * the same records, the floor? The codec alone (single-object header, limit checks, row conversion) is measured
 * too, to split the gap between the codec and the archive.
 *
 * <p>Set-up, not timed: one hour partition of {@value #RECORDS} records of about 60 bytes, stored in memory (so
 * the figure is CPU, not disk), and a plan whose one task rewrites it for a one-record batch. Every score is
 * nanoseconds per stored record. The peer gets its usual best settings: reused decoder, encoder and record.
 *
 * <p>Run: {@code java -jar benchmarks/target/benchmarks.jar AvroRewriteBenchmark}
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 5, time = 2)
@Measurement(iterations = 5, time = 2)
@Fork(value = 1, jvmArgsAppend = {"-Xmx2g"})
public class AvroRewriteBenchmark {
    /** Records in the rewritten partition. */
    public static final int RECORDS = 20_000;

    static final Schema SCHEMA = new Schema.Parser().parse("""
            {"type": "record", "name": "Bench", "namespace": "b", "fields": [
              {"name": "id", "type": "string"}, {"name": "seq", "type": "long"},
              {"name": "at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
              {"name": "value", "type": "double"}, {"name": "note", "type": ["null", "string"]},
              {"name": "tags", "type": {"type": "array", "items": "string"}},
              {"name": "clock", "type": {"type": "map", "values": "long"}}]}""");

    static final DatasetSpec SPEC = DatasetSpec.fromJson("""
            {"key": ["id"], "order": ["at"], "partition": {"field": "at", "unit": "hour"},
             "merge": {"policy": "last-writer", "version": "seq"}}""", "benchmark spec");

    /** 2024-02-29T00:00Z in epoch millis: every record falls in that hour. */
    static final long HOUR0 = 1_709_164_800_000L;

    private final AvroPayloadCodec codec = AvroPayloadCodec.of(SCHEMA);
    private final GenericDatumWriter<GenericRecord> writer = new GenericDatumWriter<>(SCHEMA);
    private final GenericDatumReader<GenericRecord> reader = new GenericDatumReader<>(SCHEMA);
    private Archive<GenericRecord> archive;
    private PartitionTask task;
    private byte[][] rawBodies;
    private byte[][] payloads;
    private final ByteArrayOutputStream buffer = new ByteArrayOutputStream(128);
    private BinaryEncoder encoder;
    private BinaryDecoder decoder;
    private GenericRecord reuse;

    static GenericRecord record(int i, long seq) {
        GenericRecord r = new GenericData.Record(SCHEMA);
        r.put("id", "key-" + i);
        r.put("seq", seq);
        r.put("at", HOUR0 + i % 3_600_000);
        r.put("value", i * 0.5);
        r.put("note", i % 2 == 0 ? null : "note " + i);
        r.put("tags", List.of("a", "b" + i % 100));
        r.put("clock", Map.of("w1", (long) i, "w2", 3L));
        return r;
    }

    @Setup(Level.Trial)
    public void setUp() {
        List<GenericRecord> records = new ArrayList<>(RECORDS);
        rawBodies = new byte[RECORDS][];
        payloads = new byte[RECORDS][];
        for (int i = 0; i < RECORDS; i++) {
            GenericRecord r = record(i, 1);
            records.add(r);
            rawBodies[i] = rawEncode(r);
            payloads[i] = codec.encodeRecord(r);
        }
        AvroDataset dataset = AvroDataset.of(SCHEMA, SPEC);
        archive = Archive.builder(SPEC, dataset.access()).storage(Storage.inMemory()).codec(codec).parallelism(1).open();
        archive.apply(records);
        ApplyPlan plan = archive.plan(List.of(record(RECORDS / 2, 2)));
        if (plan.tasks().size() != 1) {
            throw new IllegalStateException("the one-record batch should touch one partition, not " + plan.tasks().size());
        }
        task = plan.tasks().get(0);
        checkOutputs();
    }

    /** Fails unless each benchmark computes the right result: a timing counts only then. */
    void checkOutputs() {
        if (archiveRewrite().entries() != RECORDS) {
            throw new IllegalStateException("the rewrite should keep " + RECORDS + " keys");
        }
        for (int i = 0; i < RECORDS; i += 997) {
            // map entries may come out in another order, so compare what the bytes decode to
            if (!rawDecode(rawDecodeEncode(rawBodies[i])).equals(rawDecode(rawBodies[i]))) {
                throw new IllegalStateException("raw Avro decode plus encode changed record " + i);
            }
            Row row = codec.decode(codec.writerId(), payloads[i]);
            if (!Arrays.equals(codec.encode(row), payloads[i])) {
                throw new IllegalStateException("codec decode plus encode changed record " + i);
            }
        }
    }

    private byte[] rawEncode(GenericRecord r) {
        buffer.reset();
        encoder = EncoderFactory.get().binaryEncoder(buffer, encoder);
        try {
            writer.write(r, encoder);
            encoder.flush();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return buffer.toByteArray();
    }

    private GenericRecord rawDecode(byte[] body) {
        try {
            return reader.read(null, DecoderFactory.get().binaryDecoder(body, null));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private byte[] rawDecodeEncode(byte[] body) {
        decoder = DecoderFactory.get().binaryDecoder(body, decoder);
        try {
            reuse = reader.read(reuse, decoder);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return rawEncode(reuse);
    }

    /** Onefold: the archive rewrites the touched partition through the Avro codec. */
    @Benchmark
    @OperationsPerInvocation(RECORDS)
    public PartitionResult archiveRewrite() {
        return archive.rewrite(task);
    }

    /** The codec alone: decode each stored payload to a row and encode it again. */
    @Benchmark
    @OperationsPerInvocation(RECORDS)
    public long codecDecodeEncode() {
        long bytes = 0;
        for (byte[] p : payloads) {
            bytes += codec.encode(codec.decode(codec.writerId(), p)).length;
        }
        return bytes;
    }

    /** The floor: raw Avro binary decode plus encode of the same records. */
    @Benchmark
    @OperationsPerInvocation(RECORDS)
    public long rawAvroDecodeEncode() {
        long bytes = 0;
        for (byte[] b : rawBodies) {
            bytes += rawDecodeEncode(b).length;
        }
        return bytes;
    }

    /** Deletes the chunk files the timed rewrites wrote (never committed), so memory stays flat. */
    @TearDown(Level.Iteration)
    public void dropRewrittenChunks() {
        archive.sweep(new SweepRules(1, Duration.ZERO, Duration.ZERO));
    }
}
