package dev.onefold.internal.engine;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.merge.Policy;
import java.util.Arrays;
import java.util.Comparator;

/**
 * One key's merge state: its key bytes, the state's canonical bytes and, when held in memory, the decoded state
 * (decoded again on demand after a spill). Ordered by key, then state bytes. Not thread-safe.
 */
public final class KeyedState {
    /** Key bytes ascending, then state bytes ascending: the canonical fold order. */
    public static final Comparator<KeyedState> BY_KEY_THEN_STATE = (a, b) -> {
        int c = Arrays.compareUnsigned(a.key, b.key);
        return c != 0 ? c : Arrays.compareUnsigned(a.stateBytes(), b.stateBytes());
    };

    private final byte[] key;
    private final byte[] stateBytes;
    private Object state;

    public KeyedState(byte[] key, byte[] stateBytes, Object state) {
        this.key = key;
        this.stateBytes = stateBytes;
        this.state = state;
    }

    public byte[] key() {
        return key;
    }

    public byte[] stateBytes() {
        return stateBytes;
    }

    /** The decoded state, decoding the bytes with the policy once if needed. */
    public Object state(Policy<Object> policy) {
        if (state == null) {
            state = policy.read(new ByteReader(stateBytes, "merge state"));
        }
        return state;
    }

    /** Spill codec for keyed states; decoded states are dropped and rebuilt on demand. */
    public static ExternalSorter.Codec<KeyedState> codec() {
        return new ExternalSorter.Codec<>() {
            @Override
            public void write(ByteWriter out, KeyedState item) {
                out.writeBlob(item.key);
                out.writeBlob(item.stateBytes());
            }

            @Override
            public KeyedState read(ByteReader in) {
                return new KeyedState(in.readBlob(), in.readBlob(), null);
            }

            @Override
            public long estimatedBytes(KeyedState item) {
                // arrays, headers, and the decoded state, which is typically about twice its bytes
                return 96L + item.key.length + 3L * item.stateBytes().length;
            }
        };
    }
}
