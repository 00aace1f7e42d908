package dev.onefold.internal.archive;

import dev.onefold.internal.engine.KeyedState;
import dev.onefold.internal.merge.MergeCounts;
import dev.onefold.internal.merge.Policy;
import dev.onefold.reconcile.Digest;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.SortedSet;
import java.util.TreeMap;
import java.util.TreeSet;
import org.roaringbitmap.RoaringBitmap;

/**
 * Plans how a consolidated batch changes an archive version: finds each batch key's existing state, merges it
 * with the batch's state, decides the key's partition (that of the merged state's anchor) and produces one
 * {@link RewriteTask} per partition that gains or loses a key.
 *
 * <h2>Finding existing states</h2>
 * With stable partitions (the spec's {@code stable} flag) a key can only live in the partition of its batch
 * state's anchor, so only chunks of those partitions are probed. Otherwise a key may have moved, so every chunk
 * of the base version is probed. A probe tests the batch's key hashes against the chunk's key-hash index, read
 * alone (a ranged read of a few bytes per key, cached by immutable chunk name); only chunks whose index holds a
 * batch key hash are read in full. Cost with stable partitions: the touched partitions' indexes. Cost without:
 * the indexes of every chunk (about 2-4 bytes per stored key, once per process thanks to the cache) plus, per
 * hash collision, a needless chunk read (rate about batch keys / 2^32 per stored key).
 *
 * <h2>Invariants</h2>
 * A key whose merged state is identical to its stored state in the same partition changes nothing, so
 * re-applying a batch touches no partition. Deterministic: the plan is a pure function of the batch, the base
 * version and the clock reading. Not thread-safe; one instance per plan.
 */
public final class Planner {
    private final DatasetCodecs codecs;
    private final ChunkStore chunks;

    public Planner(DatasetCodecs codecs, ChunkStore chunks) {
        this.codecs = codecs;
        this.chunks = chunks;
    }

    private record Found(String partition, Object state, byte[] bytes, long deletedSince) {}

    /** Builds the plan; {@code batch} holds one folded state per key in key order, under the current codec. */
    public Plan plan(List<KeyedState> batch, Manifest base, long nowMillis, long horizonMillis, long chunkTargetBytes) {
        Policy<Object> policy = codecs.policy();
        IoCounters io = new IoCounters();
        RoaringBitmap hashes = new RoaringBitmap();
        Map<ByteBuffer, Integer> index = new HashMap<>();
        for (int i = 0; i < batch.size(); i++) {
            hashes.add(ChunkFormat.keyHash(batch.get(i).key()));
            index.put(ByteBuffer.wrap(batch.get(i).key()), i);
        }
        Map<String, PartitionEntry> parts = base.byName();
        List<PartitionEntry> probe = new ArrayList<>();
        if (codecs.stablePartitions()) {
            TreeMap<String, PartitionEntry> anchored = new TreeMap<>();
            for (KeyedState ks : batch) {
                String name = PartitionNames.encode(codecs.partition(ks.state(policy)));
                PartitionEntry p = parts.get(name);
                if (p != null) {
                    anchored.put(name, p);
                }
            }
            probe.addAll(anchored.values());
        } else {
            probe.addAll(base.partitions());
        }
        List<List<Found>> found = new ArrayList<>(batch.size());
        for (int i = 0; i < batch.size(); i++) {
            found.add(null);
        }
        for (PartitionEntry p : probe) {
            for (ChunkRef c : p.chunks()) {
                if (!RoaringBitmap.intersects(hashes, chunks.index(c, io))) {
                    continue;
                }
                Iterator<ChunkEntry> it = chunks.open(c, io).iterator();
                while (it.hasNext()) {
                    ChunkEntry e = it.next();
                    if (!hashes.contains(ChunkFormat.keyHash(e.key()))) {
                        continue;
                    }
                    Integer at = index.get(ByteBuffer.wrap(e.key()));
                    if (at == null) {
                        continue;
                    }
                    Object state = codecs.decode(c.writerId(), e.state(), c.name());
                    byte[] bytes = c.writerId().equals(codecs.writerId()) ? e.state() : policy.toBytes(state);
                    if (found.get(at) == null) {
                        found.set(at, new ArrayList<>(1));
                    }
                    found.get(at).add(new Found(p.name(), state, bytes, e.deletedSince()));
                }
            }
        }
        MergeCounts counts = new MergeCounts();
        Map<String, List<ChunkEntry>> incoming = new TreeMap<>();
        Map<String, List<byte[]>> removed = new TreeMap<>();
        Map<String, List<String>> values = new HashMap<>();
        long moved = 0;
        for (int i = 0; i < batch.size(); i++) {
            KeyedState ks = batch.get(i);
            List<Found> existing = found.get(i) == null ? List.of() : found.get(i);
            Object merged = merge(policy, ks, existing, counts);
            long since = -1;
            if (policy.isDeleted(merged)) {
                since = nowMillis;
                for (Found f : existing) {
                    if (f.deletedSince >= 0) {
                        since = Math.min(since, f.deletedSince);
                    }
                }
            }
            List<String> dest = codecs.partition(merged);
            String destName = PartitionNames.encode(dest);
            byte[] mergedBytes = policy.toBytes(merged);
            if (existing.size() == 1 && existing.get(0).partition.equals(destName)
                    && Arrays.equals(existing.get(0).bytes, mergedBytes) && existing.get(0).deletedSince == since) {
                continue;
            }
            for (Found f : existing) {
                removed.computeIfAbsent(f.partition, k -> new ArrayList<>()).add(ks.key());
                if (!f.partition.equals(destName)) {
                    moved++;
                }
            }
            values.putIfAbsent(destName, dest);
            incoming.computeIfAbsent(destName, k -> new ArrayList<>())
                    .add(new ChunkEntry(ks.key(), codecs.entryOrder(merged), mergedBytes, since));
        }
        TreeMap<String, RewriteTask> tasks = new TreeMap<>();
        for (String name : union(incoming.keySet(), removed.keySet())) {
            PartitionEntry p = parts.get(name);
            List<ChunkEntry> in = incoming.getOrDefault(name, List.of());
            List<ChunkEntry> sorted = new ArrayList<>(in);
            sorted.sort(Comparator.comparing(ChunkEntry::order, Arrays::compareUnsigned));
            List<byte[]> rm = removed.getOrDefault(name, List.of());
            tasks.put(name, new RewriteTask(p != null ? p.values() : values.get(name), name,
                    p != null ? p.chunks() : List.of(), rm, sorted, codecs.writerId(), nowMillis, horizonMillis,
                    chunkTargetBytes, derivableDigest(p)));
        }
        return new Plan(base, new ArrayList<>(tasks.values()), hashes, moved, counts.superseded, counts.conflicts,
                io.bytesRead());
    }

    /**
     * The stored digest of a partition when its rewrite may derive the new digest from it (stored minus removed
     * plus incoming), so kept entries need no decoding: when the spec declares no checks (a min or max cannot be
     * un-added, and a sum cannot tell when it must become empty again) and every chunk is under the current writer
     * id (an older one's digest rows may differ from the current codec's). Otherwise null.
     */
    private Digest derivableDigest(PartitionEntry p) {
        if (!codecs.spec().checks().isEmpty()) {
            return null;
        }
        if (p == null) {
            return Digest.empty(0);
        }
        for (ChunkRef c : p.chunks()) {
            if (!c.writerId().equals(codecs.writerId())) {
                return null;
            }
        }
        return p.digest();
    }

    private static SortedSet<String> union(Set<String> a, Set<String> b) {
        TreeSet<String> s = new TreeSet<>(a);
        s.addAll(b);
        return s;
    }

    /** Folds the batch state with the stored ones in canonical order (ascending state bytes). */
    private static Object merge(Policy<Object> policy, KeyedState batchState, List<Found> existing, MergeCounts counts) {
        if (existing.isEmpty()) {
            return batchState.state(policy);
        }
        List<KeyedState> all = new ArrayList<>();
        all.add(batchState);
        for (Found f : existing) {
            all.add(new KeyedState(batchState.key(), f.bytes, f.state));
        }
        all.sort(KeyedState.BY_KEY_THEN_STATE);
        Object acc = all.get(0).state(policy);
        byte[] last = all.get(0).stateBytes();
        for (int i = 1; i < all.size(); i++) {
            if (Arrays.equals(last, all.get(i).stateBytes())) {
                continue;
            }
            last = all.get(i).stateBytes();
            acc = policy.merge(acc, all.get(i).state(policy), counts);
        }
        return acc;
    }
}
