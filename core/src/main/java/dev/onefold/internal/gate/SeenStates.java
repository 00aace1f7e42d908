package dev.onefold.internal.gate;

import com.github.benmanes.caffeine.cache.Cache;
import com.github.benmanes.caffeine.cache.Caffeine;
import com.github.benmanes.caffeine.cache.RemovalCause;
import dev.onefold.gate.StoredStateLookup;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.merge.Policy;
import java.time.Duration;
import java.util.HashMap;
import java.util.Map;
import java.util.function.LongSupplier;

/**
 * The merge state the gate knows for each key, looked up in three places in turn:
 * <ol>
 *   <li>the window: recent keys and their states, bounded by entries and by age since last access;</li>
 *   <li>states emitted but not yet acknowledged by the sink, which the window must not forget (the sink may not
 *       have stored them yet, so the stored-state lookup would return something older);</li>
 *   <li>in exact mode only, the stored-state lookup (the archive the sink writes to).</li>
 * </ol>
 *
 * <h2>Eviction</h2>
 * The window is a Caffeine cache run on the caller's thread, so evictions happen during the gate's own calls
 * and are counted there. An evicted key's state survives in the second place while an emit of it awaits its
 * acknowledgement.
 *
 * <p>Not thread-safe; the gate guards it with its lock.
 */
public final class SeenStates {

    /** A known state: its canonical bytes and its decoded form. */
    public record Known(byte[] bytes, Object state) {}

    private static final class Awaiting {
        Known known;
        int emits;

        Awaiting(Known known) {
            this.known = known;
        }
    }

    private final Policy<Object> policy;
    private final StoredStateLookup lookup;
    private final Cache<KeyBytes, Known> window;
    private final Map<KeyBytes, Awaiting> awaiting = new HashMap<>();
    private long evictions;
    private long lookups;
    private long lookupHits;

    /**
     * @param lookup the stored-state lookup, or null for windowed mode
     */
    public SeenStates(Policy<Object> policy, StoredStateLookup lookup, long maxKeys, Duration maxAge, LongSupplier nanoClock) {
        this.policy = policy;
        this.lookup = lookup;
        this.window = Caffeine.newBuilder()
                .maximumSize(maxKeys)
                .expireAfterAccess(maxAge)
                .ticker(nanoClock::getAsLong)
                .executor(Runnable::run)
                .evictionListener((KeyBytes k, Known v, RemovalCause cause) -> evictions++)
                .build();
    }

    /** The known state of a key, or null when the key counts as unseen. */
    public Known get(KeyBytes key) {
        Known k = window.getIfPresent(key);
        if (k != null) {
            return k;
        }
        Awaiting a = awaiting.get(key);
        if (a != null) {
            window.put(key, a.known);
            return a.known;
        }
        if (lookup == null) {
            return null;
        }
        lookups++;
        byte[] stored = lookup.storedState(key.bytes());
        if (stored == null) {
            return null;
        }
        lookupHits++;
        Known found = new Known(stored, policy.read(new ByteReader(stored, "stored merge state")));
        window.put(key, found);
        return found;
    }

    /** Records a state the gate has just emitted; it is kept until {@link #acknowledged} for this emit. */
    public void emitted(KeyBytes key, Known state) {
        window.put(key, state);
        Awaiting a = awaiting.computeIfAbsent(key, k -> new Awaiting(state));
        a.known = state;
        a.emits++;
    }

    /** One emit of this key was acknowledged (or abandoned). */
    public void acknowledged(KeyBytes key) {
        Awaiting a = awaiting.get(key);
        if (a != null && --a.emits == 0) {
            awaiting.remove(key);
        }
    }

    /** Runs pending cache maintenance so sizes and eviction counts are current. */
    public void cleanUp() {
        window.cleanUp();
    }

    public long windowEntries() {
        return window.estimatedSize();
    }

    public long awaitingKeys() {
        return awaiting.size();
    }

    public long evictions() {
        return evictions;
    }

    public long lookups() {
        return lookups;
    }

    public long lookupHits() {
        return lookupHits;
    }
}
