package dev.onefold.benchmarks.reconcile;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.onefold.reconcile.ReconciliationReport;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeSet;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Sanity of question 5 on small archives: agreement is proven, and exactly the ten injected keys are named. */
class ReconcileArchivesBenchmarkTest {

    @Test
    void compare_smallPairAgreesThenNamesTheTenKeys(@TempDir Path dir) {
        ArchivePair pair = ArchivePair.build(dir, 6_000, 48, 1_400, 2_200);

        ReconciliationReport agreeing = pair.requireAgreement(pair.compareAgreeing());
        assertEquals(48, agreeing.partitions().size());

        ReconciliationReport differing = pair.requireTheDifferences(pair.locateDifferences());
        TreeSet<Object> named = new TreeSet<>();
        List<String> kinds = new ArrayList<>();
        for (ReconciliationReport.PartitionResult p : differing.partitions()) {
            if (p.drillDown() != null) {
                p.drillDown().contentDiffers().forEach(k -> { named.add(k.key().get("id")); kinds.add("changed"); });
                p.drillDown().missingRight().forEach(k -> { named.add(k.key().get("id")); kinds.add("deleted"); });
                p.drillDown().missingLeft().forEach(k -> { named.add(k.key().get("id")); kinds.add("added"); });
            }
        }
        TreeSet<Object> injected = new TreeSet<>();
        ArchivePair.differences(6_000, 48).forEach(r -> injected.add(r.get("id")));
        assertEquals(injected, named);
        assertEquals(Map.of("changed", 4L, "deleted", 3L, "added", 3L), kinds.stream().collect(
                java.util.stream.Collectors.groupingBy(k -> k, java.util.stream.Collectors.counting())));
        assertThrows(IllegalStateException.class, () -> pair.requireAgreement(differing));
        assertThrows(IllegalStateException.class, () -> pair.requireTheDifferences(agreeing));
    }

    @Test
    void benchmarkMethods_checkTheirAnswersOnATinyPairAndCleanUp() throws Exception {
        ReconcileArchivesBenchmark bench = new ReconcileArchivesBenchmark();
        bench.records = 6_000;
        bench.hours = 48;
        bench.build();
        try {
            assertEquals(48, bench.compareAgreeing().partitions().size());
            assertEquals(10, bench.locateTenDifferences().partitions().stream()
                    .filter(p -> p.drillDown() != null)
                    .mapToInt(p -> p.drillDown().contentDiffers().size() + p.drillDown().missingLeft().size()
                            + p.drillDown().missingRight().size())
                    .sum());
        } finally {
            bench.delete();
        }
        assertFalse(Files.exists(bench.dir));
    }
}
