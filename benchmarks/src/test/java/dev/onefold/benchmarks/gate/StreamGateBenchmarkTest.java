package dev.onefold.benchmarks.gate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.gate.Decision;
import org.junit.jupiter.api.Test;

/** The benchmark measures what it says: a filled window, then alternating newer versions and duplicates. */
class StreamGateBenchmarkTest {

    @Test
    void offer_alternatesNewerVersionEmitsAndDuplicateDrops() {
        StreamGateBenchmark b = new StreamGateBenchmark();
        b.windowKeys = 1000;
        b.setUp();
        assertEquals(1000, b.gate.metrics().windowKeys());
        for (int i = 0; i < 100; i++) {
            assertEquals(Decision.Reason.NEWER_VERSION, b.offer().reason());
            assertEquals(Decision.Reason.DUPLICATE, b.offer().reason());
        }
        assertEquals(0, b.gate.metrics().awaitingAck(), "every emit was acknowledged");
        assertEquals(0, b.gate.metrics().windowEvictions(), "every key stays in the window");
        assertTrue(b.retainedBytesPerKey > 0, "the filled window retains heap");
    }
}
