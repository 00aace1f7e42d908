package dev.onefold.testing;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.engine.CloseableIterator;
import dev.onefold.internal.engine.Consolidator;
import dev.onefold.internal.engine.KeyedState;
import dev.onefold.internal.engine.Publisher;
import dev.onefold.record.Row;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.List;

/** Test helpers that run the engine's two stages directly, so tests can compare merge states byte for byte. */
public final class Folding {
    private Folding() {}

    private static final Path TMP = Path.of(System.getProperty("java.io.tmpdir"));

    /** The folded states of records, as hex "key:state" strings in key order. */
    public static List<KeyedState> fold(BoundDataset ds, List<Row> rows, long budget) {
        try (Consolidator c = new Consolidator(ds, budget, TMP, true)) {
            long i = 0;
            for (Row r : rows) {
                c.add(r, "test", i++, r, rej -> {
                    throw new AssertionError("unexpected rejection " + rej);
                });
            }
            return drain(c);
        }
    }

    /** Folds each batch separately, then folds the batches' states together. */
    public static List<KeyedState> foldBatches(BoundDataset ds, List<List<Row>> batches, long budget) {
        List<KeyedState> all = new ArrayList<>();
        for (List<Row> b : batches) {
            all.addAll(fold(ds, b, budget));
        }
        try (Consolidator c = new Consolidator(ds, budget, TMP, true)) {
            all.forEach(c::addState);
            return drain(c);
        }
    }

    private static List<KeyedState> drain(Consolidator c) {
        List<KeyedState> out = new ArrayList<>();
        try (CloseableIterator<KeyedState> it = c.folded()) {
            it.forEachRemaining(out::add);
        }
        return out;
    }

    public static List<String> hex(List<KeyedState> states) {
        List<String> out = new ArrayList<>();
        for (KeyedState s : states) {
            out.add(HexFormat.of().formatHex(s.key()) + ":" + HexFormat.of().formatHex(s.stateBytes()));
        }
        return out;
    }

    /** The visible rows of folded states, in order. */
    public static List<Row> publish(BoundDataset ds, List<KeyedState> states) {
        List<Row> out = new ArrayList<>();
        try (Publisher p = new Publisher(ds, 1 << 20, TMP, true)) {
            p.addAll(states.iterator());
            try (CloseableIterator<Row> it = p.sorted()) {
                it.forEachRemaining(out::add);
            }
        }
        return out;
    }

    public static BoundDataset bind(DatasetSpec spec) {
        return BoundDataset.bind(spec, Fixtures.SCHEMA);
    }
}
