package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import dev.onefold.internal.merge.Policy;
import dev.onefold.reconcile.Digest;
import dev.onefold.record.Row;
import dev.onefold.spi.Storage;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.Iterator;
import java.util.List;
import java.util.Set;

/**
 * Rewrites one partition: streams its base chunks in order, drops the keys the task removes and tombstones past
 * the horizon, merges in the task's incoming entries by order, and cuts the result into new chunk files of about
 * the target size, computing the partition's digest on the way.
 *
 * <h2>Invariants</h2>
 * The output is strictly ascending by order and holds each key once; it is a pure function of the task (chunk
 * names aside), so a rerun, another thread or another process gives the same entries and digest. Entries of
 * chunks written under an older writer id are re-encoded under the current one.
 *
 * <h2>Digest</h2>
 * When the task carries the partition's stored digest (see {@link RewriteTask#baseDigest()}), the new digest is
 * the stored one minus the removed keys' records plus the incoming ones (the content hash is a sum, so this is
 * exact), and kept entries are copied without decoding their states. Otherwise every kept entry is decoded and
 * the digest recomputed from all visible records.
 *
 * <h2>Complexity</h2>
 * Reads each base chunk once and writes the partition once: O(partition + incoming), where a kept entry costs
 * parsing and copying its bytes (plus decoding its state when the digest must be recomputed). Memory: one base
 * chunk, one chunk being built (each about the target size), the task's incoming entries and removed keys; never
 * the whole partition, so a partition larger than memory rewrites fine. Thread-safe: no state between calls.
 */
public final class PartitionRewriter {
    private final DatasetCodecs codecs;
    private final ChunkStore chunks;

    public PartitionRewriter(DatasetCodecs codecs, ChunkStore chunks) {
        this.codecs = codecs;
        this.chunks = chunks;
    }

    /**
     * Runs a task; the new chunk files are written and synced when it returns.
     *
     * @throws OnefoldException CORRUPT naming a damaged base chunk; USAGE when the task was made for another codec
     */
    public RewriteResult run(RewriteTask task) {
        RewriteResult r = runUnsynced(task);
        sync(chunks.storage(), List.of(r));
        return r;
    }

    /** Makes the chunk files of results durable, all in one storage call (so shared directories sync once). */
    static void sync(Storage storage, List<RewriteResult> results) {
        List<String> names = new ArrayList<>();
        for (RewriteResult r : results) {
            for (ChunkRef c : r.partition().chunks()) {
                names.add(c.name());
            }
        }
        storage.sync(names);
    }

    /** Runs a task leaving its files written but not yet synced: the caller must {@link #sync} them before commit. */
    RewriteResult runUnsynced(RewriteTask task) {
        if (!task.writerId().equals(codecs.writerId())) {
            throw OnefoldException.usage("partition task for " + task.name() + " was planned for writer id "
                    + task.writerId() + " but this archive writes " + codecs.writerId());
        }
        IoCounters io = new IoCounters();
        Set<ByteBuffer> removed = new HashSet<>();
        for (byte[] k : task.removedKeys()) {
            removed.add(ByteBuffer.wrap(k));
        }
        Policy<Object> policy = codecs.policy();
        boolean derived = task.baseDigest() != null;
        Iterator<ChunkStore.Located> base = chunks.entries(task.baseChunks(), io);
        Iterator<ChunkEntry> incoming = task.incoming().iterator();
        Output out = new Output(task, io);
        ChunkStore.Located b = nextKept(base, removed, out);
        ChunkEntry in = incoming.hasNext() ? incoming.next() : null;
        while (b != null || in != null) {
            int c = b == null ? 1 : in == null ? -1 : Arrays.compareUnsigned(b.entry().order(), in.order());
            if (c == 0) {
                throw ChunkValidator.problem(b.file(), ChunkValidator.Problem.MISMATCH, "holds a key the batch also "
                        + "places in partition " + task.name() + " although the planner did not remove it");
            }
            if (c < 0) {
                ChunkEntry e = b.entry();
                if (derived) {
                    out.add(e, null);
                } else {
                    Object state = codecs.decode(b.writerId(), e.state(), b.file());
                    byte[] bytes = b.writerId().equals(task.writerId()) ? e.state() : policy.toBytes(state);
                    out.add(new ChunkEntry(e.key(), e.order(), bytes, e.deletedSince()), state);
                }
                b = nextKept(base, removed, out);
            } else {
                out.add(in, policy.read(new dev.onefold.internal.bytes.ByteReader(in.state(), "partition task " + task.name())));
                in = incoming.hasNext() ? incoming.next() : null;
            }
        }
        return out.finish();
    }

    /** The next base entry the task keeps; removed ones are taken out of a derived digest on the way. */
    private ChunkStore.Located nextKept(Iterator<ChunkStore.Located> it, Set<ByteBuffer> removed, Output out) {
        while (it.hasNext()) {
            ChunkStore.Located l = it.next();
            if (!removed.contains(ByteBuffer.wrap(l.entry().key()))) {
                return l;
            }
            out.subtract(l);
        }
        return null;
    }

    /** Collects output entries into chunks, the digest and the counts. */
    private final class Output {
        final RewriteTask task;
        final IoCounters io;
        final Digest.Builder digest = new Digest.Builder(codecs.spec(), codecs.schema());
        final Digest.Builder subtracted = new Digest.Builder(codecs.spec(), codecs.schema());
        final List<ChunkRef> written = new ArrayList<>();
        ChunkFormat.Builder builder = new ChunkFormat.Builder();
        long entries;
        long tombstones;
        long dropped;

        Output(RewriteTask task, IoCounters io) {
            this.task = task;
            this.io = io;
        }

        /** Adds an entry; {@code state} is null for a kept base entry whose digest share is already counted. */
        void add(ChunkEntry e, Object state) {
            if (e.deleted() && task.horizonMillis() >= 0 && e.deletedSince() < task.nowMillis() - task.horizonMillis()) {
                dropped++;
                return;
            }
            if (state != null) {
                digest.addKey(e.key(), codecs.policy().visible(state));
            }
            entries++;
            if (e.deleted()) {
                tombstones++;
            }
            builder.add(e);
            if (builder.approximateBytes() >= task.chunkTargetBytes()) {
                flush();
            }
        }

        /** Takes a removed base entry's records out of a derived digest. */
        void subtract(ChunkStore.Located removed) {
            if (task.baseDigest() != null) {
                Object state = codecs.decode(removed.writerId(), removed.entry().state(), removed.file());
                subtracted.addKey(removed.entry().key(), codecs.policy().visible(state));
            }
        }

        void flush() {
            if (builder.entries() > 0) {
                written.add(chunks.write(task.name(), task.writerId(), builder, io));
                builder = new ChunkFormat.Builder();
            }
        }

        RewriteResult finish() {
            flush();
            long bytes = 0;
            for (ChunkRef c : written) {
                bytes += c.bytes();
            }
            Digest d = digest.build();
            if (task.baseDigest() != null) {
                Digest base = task.baseDigest();
                Digest gone = subtracted.build();
                d = new Digest(base.keys() - gone.keys() + d.keys(), base.records() - gone.records() + d.records(),
                        base.contentHash() - gone.contentHash() + d.contentHash(), d.aggregates());
            }
            PartitionEntry p = new PartitionEntry(task.values(), task.name(), written, d, entries, tombstones, bytes);
            return new RewriteResult(p, task.fingerprint(), io.bytesRead(), io.bytesWritten(), dropped);
        }
    }
}
