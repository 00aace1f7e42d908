package dev.onefold.testkit;

import java.util.List;
import java.util.Random;

/**
 * Makes the distinct records for one seeded try of {@link SinkCheck#verifySeeds}: the same random source
 * must give the same records, so a failing seed reproduces. Called from one thread.
 */
@FunctionalInterface
public interface RecordGenerator<R> {
    List<R> generate(Random random);
}
