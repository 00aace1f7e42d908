package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import dev.onefold.internal.engine.CloseableIterator;
import dev.onefold.internal.engine.ExternalSorter;
import dev.onefold.internal.engine.KeyedState;
import dev.onefold.reconcile.Digest;
import dev.onefold.record.Row;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HexFormat;
import java.util.Iterator;
import java.util.List;
import java.util.Objects;
import org.roaringbitmap.RoaringBitmap;

/**
 * Checks an archive end to end and lists every problem with the file it is in: every manifest parses; for the
 * checked version every chunk exists with the listed size, every section checksum holds, entries ascend within
 * and across chunks, every state decodes and belongs to its partition, the key-hash index equals the hashes of
 * the keys, counts and digests equal the manifest's (for a partition written under an earlier schema, the
 * digest's key and record counts only), and no key is stored in two places.
 *
 * <h2>Complexity</h2>
 * Reads every chunk of the version once; key uniqueness sorts all keys under the memory budget (spilling).
 * Thread-safe: holds no mutable state.
 */
public final class Verifier {
    private final DatasetCodecs codecs;
    private final ChunkStore chunks;
    private final Committer committer;
    private final long budget;
    private final Path spillDir;

    public Verifier(DatasetCodecs codecs, ChunkStore chunks, Committer committer, long budgetBytes, Path spillDir) {
        this.codecs = codecs;
        this.chunks = chunks;
        this.committer = committer;
        this.budget = budgetBytes;
        this.spillDir = spillDir;
    }

    /** One problem and the file it was found in. */
    public record Problem(String file, String message) {}

    /** Checks every manifest, and deeply the given version (the latest when -1). */
    public List<Problem> verify(long version) {
        List<Problem> problems = new ArrayList<>();
        Manifest checked = null;
        List<Long> versions = committer.versions();
        long target = version >= 0 ? version : versions.isEmpty() ? -1 : versions.get(versions.size() - 1);
        for (long v : versions) {
            try {
                Manifest m = committer.read(v);
                if (v == target) {
                    checked = m;
                }
            } catch (OnefoldException e) {
                problems.add(new Problem(Manifest.fileName(v), e.getMessage()));
            }
        }
        if (checked == null) {
            if (target >= 0 && !versions.contains(target)) {
                problems.add(new Problem(Manifest.fileName(target), "version " + target + " does not exist"));
            }
            return problems;
        }
        try (ExternalSorter<KeyedState> keys = new ExternalSorter<>(KeyedState.BY_KEY_THEN_STATE, KeyedState.codec(),
                budget, spillDir, false)) {
            for (PartitionEntry p : checked.partitions()) {
                verifyPartition(Manifest.fileName(checked.version()), p, keys, problems);
            }
            try (CloseableIterator<KeyedState> sorted = keys.sorted()) {
                KeyedState previous = null;
                while (sorted.hasNext()) {
                    KeyedState k = sorted.next();
                    if (previous != null && Arrays.equals(previous.key(), k.key())) {
                        problems.add(new Problem(new String(k.stateBytes(), StandardCharsets.UTF_8), "key "
                                + HexFormat.of().formatHex(k.key()) + " is also stored in "
                                + new String(previous.stateBytes(), StandardCharsets.UTF_8)));
                    }
                    previous = k;
                }
            }
        }
        return problems;
    }

    private void verifyPartition(String manifestFile, PartitionEntry p, ExternalSorter<KeyedState> keys,
            List<Problem> problems) {
        Digest.Builder digest = new Digest.Builder(codecs.spec(), codecs.schema());
        long entries = 0;
        long tombstones = 0;
        long bytes = 0;
        boolean complete = true;
        byte[] last = null;
        IoCounters io = new IoCounters();
        for (ChunkRef c : p.chunks()) {
            bytes += c.bytes();
            try {
                ChunkFormat.Reader r = chunks.open(c, io);
                RoaringBitmap hashes = new RoaringBitmap();
                Iterator<ChunkEntry> it = r.iterator();
                while (it.hasNext()) {
                    ChunkEntry e = it.next();
                    ChunkValidator.checkAscending(c.name(), last, e.order(), "its first entry (after the previous chunk)");
                    last = e.order();
                    Object state = codecs.decode(c.writerId(), e.state(), c.name());
                    List<String> at = codecs.partition(state);
                    if (!Objects.equals(at, p.values())) {
                        problems.add(new Problem(c.name(), "key " + HexFormat.of().formatHex(e.key()) + " belongs to partition "
                                + at + ", not " + p.values()));
                    }
                    List<Row> visible = codecs.policy().visible(state);
                    if (visible.isEmpty() != e.deleted()) {
                        problems.add(new Problem(c.name(), "key " + HexFormat.of().formatHex(e.key())
                                + " has a deleted mark that disagrees with its state"));
                    }
                    digest.addKey(e.key(), visible);
                    hashes.add(ChunkFormat.keyHash(e.key()));
                    keys.add(new KeyedState(e.key(), c.name().getBytes(StandardCharsets.UTF_8), null));
                    entries++;
                    tombstones += e.deleted() ? 1 : 0;
                }
                if (!hashes.equals(r.index())) {
                    problems.add(new Problem(c.name(), ChunkValidator.Problem.MISMATCH + ": key-hash index differs from "
                            + "the hashes of the stored keys"));
                }
            } catch (OnefoldException e) {
                problems.add(new Problem(c.name(), e.getMessage()));
                complete = false;
            }
        }
        if (!complete) {
            return;
        }
        String where = manifestFile + " partition " + p.name();
        if (entries != p.entries() || tombstones != p.tombstones() || bytes != p.bytes()) {
            problems.add(new Problem(where, "lists " + p.entries() + " entries, " + p.tombstones() + " tombstones, "
                    + p.bytes() + " bytes; the chunks hold " + entries + ", " + tombstones + ", " + bytes));
        }
        Digest read = digest.build();
        boolean asWritten = codecs.readsAsWritten(p);
        // a partition written under an earlier schema digested its records as written then; read now they carry
        // defaults and widened values, so only its key and record counts can still be compared
        if (asWritten ? !read.equals(p.digest()) : read.keys() != p.digest().keys() || read.records() != p.digest().records()) {
            problems.add(new Problem(where, "digest " + p.digest() + " differs from the chunks' " + read
                    + (asWritten ? "" : " (written under an earlier schema: key and record counts compared)")));
        }
    }
}
