package dev.onefold.examples.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The README's demo command, run as a user runs it; the demo checks its own results and exits 1 if any is off. */
class DemoIT {
    @TempDir
    Path dir;

    @Test
    void demo_readmeCommand_passesItsChecksAndLeavesItsFiles() {
        Path demo = dir.resolve("onefold-demo");
        ToolProcess.Result r = ToolProcess.run(dir, "demo", "--dir", demo.toString());

        assertEquals(0, r.status(), r::out);
        assertEquals("", r.err());
        assertTrue(r.out().contains("all demo checks passed"), r.out());
        for (String f : List.of("readings.avsc", "status.avsc", "status.spec.json", "summaries.avsc",
                "inputs/readings-1-day1.jsonl", "inputs/readings-2-day2.avro", "rejects/readings-1-day1.jsonl",
                "reports/readings-4-late.json", "expected/readings.jsonl", "export/readings.jsonl",
                "archive/readings/schemas/0001.avsc")) {
            assertTrue(Files.isRegularFile(demo.resolve(f)), f);
        }

        // the archives it leaves are the tool's: the commands it suggests work on them
        assertEquals(0, ToolProcess.run(dir, "verify", "--archive", demo.resolve("archive/status").toString()).status());
        ToolProcess.Result stale = ToolProcess.run(dir, "reconcile", "--schema", demo.resolve("readings.avsc").toString(),
                "--left", demo.resolve("archive/readings").toString(), "--right",
                demo.resolve("expected/readings-stale.jsonl").toString());
        assertEquals(1, stale.status(), stale::out);

        // running it again in the same directory starts over and passes again
        assertEquals(0, ToolProcess.run(dir, "demo", "--dir", demo.toString()).status());
    }
}
