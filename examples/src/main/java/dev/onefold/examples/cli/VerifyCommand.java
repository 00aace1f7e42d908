package dev.onefold.examples.cli;

import dev.onefold.archive.PartitionInfo;
import dev.onefold.archive.Snapshot;
import dev.onefold.archive.VerifyReport;
import java.io.PrintStream;
import java.nio.file.Path;

/**
 * {@code onefold verify}: checks every manifest and every chunk of the latest version (checksums, order,
 * partition membership, key-hash indexes, counts and digests, key uniqueness). Prints one line per problem, each
 * naming its file, and returns 1 when there is any. Stateless.
 */
final class VerifyCommand {
    private VerifyCommand() {}

    static int run(CommandLine cl, PrintStream out) {
        Path dir = cl.requiredPath("archive");
        ArchiveDirectory archive = ArchiveDirectory.open(dir);
        VerifyReport report = archive.archive().verify();
        if (!report.ok()) {
            for (VerifyReport.Problem p : report.problems()) {
                out.println("problem: " + p.file() + ": " + p.message());
            }
            out.printf("verify: archive %s version %d has %d problem(s)%n", dir, report.version(), report.problems().size());
            return 1;
        }
        Snapshot<InputRecord> s = archive.archive().snapshot(report.version());
        long records = s.partitions().stream().mapToLong(p -> p.digest().records()).sum();
        int chunks = s.partitions().stream().mapToInt(PartitionInfo::chunkFiles).sum();
        out.printf("verify: ok: archive %s version %d, %,d records in %,d partitions and %,d chunk files%n", dir,
                report.version(), records, s.partitions().size(), chunks);
        return 0;
    }
}
