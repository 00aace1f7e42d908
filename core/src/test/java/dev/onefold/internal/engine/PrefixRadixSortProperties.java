package dev.onefold.internal.engine;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.stream.IntStream;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;

/**
 * The radix sort of order prefixes against the JDK's own stable sort of the same positions by
 * {@link Long#compareUnsigned} (the reference). Prefixes are drawn to share leading, trailing or middle bytes,
 * since the sort skips a byte every prefix shares, and to repeat, since equal prefixes must keep input order.
 */
class PrefixRadixSortProperties {

    @Property(tries = 1000)
    void sortsLikeTheJdkStableSortByUnsignedValue(@ForAll("prefixes") List<Long> input) {
        long[] keys = input.stream().mapToLong(Long::longValue).toArray();
        long[] original = keys.clone();
        // the buffers may be longer than the input, as the workspace hands them out
        int n = keys.length;
        PrefixRadixSort.Sorted sorted = PrefixRadixSort.sort(Arrays.copyOf(keys, n + 3), n, new int[n + 5],
                new long[n + 1], new int[n + 2]);
        Integer[] expected = IntStream.range(0, n).boxed().toArray(Integer[]::new);
        Arrays.sort(expected, Comparator.comparing((Integer i) -> original[i], Long::compareUnsigned));
        assertArrayEquals(Arrays.stream(expected).mapToInt(Integer::intValue).toArray(),
                Arrays.copyOf(sorted.index(), n), "positions in sorted order, equal prefixes in input order");
        for (int i = 0; i < n; i++) {
            assertEquals(original[expected[i]], sorted.prefixes()[i]);
        }
    }

    @Provide
    Arbitrary<List<Long>> prefixes() {
        Arbitrary<Long> any = Arbitraries.longs();
        Arbitrary<Long> sharedHigh = Arbitraries.longs().between(0, 0xFFFF).map(v -> 0x8000_0123_4500_0000L | v);
        Arbitrary<Long> sharedLow = Arbitraries.longs().map(v -> v & 0xFFFF_0000_0000_0000L);
        Arbitrary<Long> sharedMiddle = Arbitraries.longs().map(v -> (v & 0xFF00_0000_0000_00FFL) | 0x0055_5555_5555_5500L);
        Arbitrary<Long> few = Arbitraries.of(0L, -1L, Long.MIN_VALUE, Long.MAX_VALUE, 1L);
        // each list from one family, so its prefixes really share the bytes, or from all of them mixed
        return Arbitraries.oneOf(List.of(any, sharedHigh, sharedLow, sharedMiddle, few,
                Arbitraries.oneOf(any, sharedHigh, sharedLow, sharedMiddle, few)).stream()
                .map(family -> family.list().ofMaxSize(300)).toList());
    }
}
