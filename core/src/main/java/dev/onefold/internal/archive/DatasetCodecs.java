package dev.onefold.internal.archive;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.encoding.RowSerde;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.hash.XxHash64;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.PayloadCodec;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.ConcurrentHashMap;

/**
 * The dataset bound for writing (states encoded with the codec's current writer id) and, on demand, for reading
 * states written under any earlier writer id, so a chunk of an older schema reads as records of the current
 * one. Also computes an entry's order bytes and partition. Thread-safe; bindings are cached per writer id.
 */
public final class DatasetCodecs {
    private final DatasetSpec spec;
    private final RowSchema schema;
    private final PayloadCodec codec;
    private final BoundDataset current;
    private final Policy<Object> canonical;
    private final long specHash;
    private final ConcurrentHashMap<String, Policy<Object>> readers = new ConcurrentHashMap<>();

    public DatasetCodecs(DatasetSpec spec, RowSchema schema, PayloadCodec codec) {
        this.spec = spec;
        this.schema = schema;
        this.codec = codec;
        this.current = BoundDataset.bind(spec, schema, RowSerde.of(codec, codec.writerId()));
        this.canonical = BoundDataset.bind(spec, schema).policy();
        this.specHash = XxHash64.hash(spec.toJson().getBytes(StandardCharsets.UTF_8));
        readers.put(codec.writerId(), current.policy());
    }

    public BoundDataset dataset() { return current; }
    public Policy<Object> policy() { return current.policy(); }
    public String writerId() { return codec.writerId(); }
    public DatasetSpec spec() { return spec; }
    public RowSchema schema() { return schema; }

    /** XXH64 of the spec's JSON form: an archive refuses a writer with a different spec. */
    public long specHash() { return specHash; }

    /**
     * Whether every chunk of a partition was written under the current writer id, so its records read exactly as
     * they were written (and its manifest digest is the digest of what reads return).
     */
    public boolean readsAsWritten(PartitionEntry partition) {
        for (ChunkRef c : partition.chunks()) {
            if (!c.writerId().equals(codec.writerId())) {
                return false;
            }
        }
        return true;
    }

    /** The policy that reads states written under {@code writerId}. */
    public Policy<Object> policyFor(String writerId) {
        return readers.computeIfAbsent(writerId, id -> BoundDataset.bind(spec, schema, RowSerde.of(codec, id)).policy());
    }

    /** Decodes an entry's state written under {@code writerId}. */
    public Object decode(String writerId, byte[] state, String file) {
        return policyFor(writerId).read(new dev.onefold.internal.bytes.ByteReader(state, file));
    }

    /**
     * A state's bytes in the engine's canonical form (canonical rows, whatever the payload codec), the form a
     * {@link dev.onefold.gate.StreamGate} compares and reads.
     */
    public byte[] canonicalBytes(Object state) {
        return canonical.toBytes(state);
    }

    /** The partition values of a state: those of its anchor record. */
    public List<String> partition(Object state) {
        return current.partition(policy().anchor(state));
    }

    /** An entry's order: the smallest order of its visible records, or its anchor's order when deleted. */
    public byte[] entryOrder(Object state) {
        List<Row> visible = policy().visible(state);
        if (visible.isEmpty()) {
            return current.order(policy().anchor(state));
        }
        byte[] min = null;
        for (Row r : visible) {
            byte[] o = current.order(r);
            if (min == null || Arrays.compareUnsigned(o, min) < 0) {
                min = o;
            }
        }
        return min;
    }

    /** Whether a key's partition values never change (the spec's {@code stable} flag). */
    public boolean stablePartitions() {
        return spec.partition() == null || spec.partition().stable();
    }
}
