package dev.onefold.reconcile;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.onefold.record.Row;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * The {@link DigestSource} contract, written once for every implementation (record streams, JDBC, and the
 * archive when it implements the interface): per partition, the entries add up to the digest, and the versions
 * of every key rebuild both its key hash and the whole digest, aggregates included. Public so that the archive's
 * tests run it over archive snapshots.
 */
public final class DigestSourceContract {
    private DigestSourceContract() {}

    public static void verify(DigestSource source, dev.onefold.record.RowSchema schema) {
        source.digests().forEach((partition, digest) -> {
            List<byte[]> keys = new ArrayList<>();
            List<Long> hashes = new ArrayList<>();
            long[] sum = {0};
            source.entries(partition, (key, hash) -> {
                keys.add(key);
                hashes.add(hash);
                sum[0] += hash;
            });
            assertEquals(digest.keys(), keys.size(), "entries of " + partition);
            assertEquals(digest.contentHash(), sum[0], "sum of key hashes of " + partition);
            Set<ByteBuffer> wanted = new HashSet<>();
            keys.forEach(k -> wanted.add(ByteBuffer.wrap(k)));
            assertEquals(keys.size(), wanted.size(), "a key listed twice in " + partition);
            Map<ByteBuffer, List<Row>> versions = source.versions(partition, wanted);
            assertEquals(wanted, versions.keySet(), "versions of " + partition);
            keys.sort(java.util.Arrays::compareUnsigned);
            Digest.Builder rebuilt = new Digest.Builder(source.spec(), schema);
            for (int i = 0; i < keys.size(); i++) {
                rebuilt.addKey(keys.get(i), versions.get(ByteBuffer.wrap(keys.get(i))));
            }
            assertEquals(digest, rebuilt.build(), "digest rebuilt from the versions of " + partition);
            source.entries(partition, (key, hash) ->
                    assertEquals(hash, Digest.keyHash(key, versions.get(ByteBuffer.wrap(key))), "key hash"));
        });
    }
}
