package dev.onefold.benchmarks.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/** The benchmark measures what it says: its set-up checks every output before a timing counts. */
class AvroRewriteBenchmarkTest {

    @Test
    void setUp_outputsCheckAndRewriteKeepsEveryKey() {
        AvroRewriteBenchmark b = new AvroRewriteBenchmark();
        b.setUp();
        assertEquals(AvroRewriteBenchmark.RECORDS, b.archiveRewrite().entries());
        assertEquals(b.rawAvroDecodeEncode() + 10L * AvroRewriteBenchmark.RECORDS, b.codecDecodeEncode(),
                "the codec writes the raw body plus the 10-byte single-object header per record");
        b.dropRewrittenChunks();
    }
}
