package dev.onefold.examples.cli;

import dev.onefold.archive.ApplyReport;
import dev.onefold.avro.AvroRecordAccess;
import dev.onefold.avro.AvroDataset;
import java.io.PrintStream;
import java.nio.file.Path;
import java.util.List;

/**
 * {@code onefold apply}: applies record files as one batch to an archive directory (created on first use), then
 * reports what changed. {@link #apply} is the same step for programs (the demo uses it). Stateless.
 */
public final class ApplyCommand {
    private ApplyCommand() {}

    static int run(CommandLine cl, PrintStream out, PrintStream err) {
        List<Path> in = cl.requiredPaths("in");
        Path dir = cl.requiredPath("archive");
        InputFiles.checkReadable(in);
        Path schema = cl.requiredPath("schema");
        Path spec = cl.optionalPath("spec");
        AvroDataset dataset = DatasetFiles.read(schema, spec);
        ArchiveDirectory archive = DatasetFiles.naming(schema, spec, () -> ArchiveDirectory.forApply(dir, dataset));
        Progress progress = Progress.onTerminal(err, "merging and rewriting the touched partitions");
        RunReport report;
        try {
            report = apply(archive, dataset, in, cl.optionalPath("rejects"), progress);
        } finally {
            progress.done();
        }
        report.writeTo(cl.optionalPath("report"));
        out.printf("apply: %d file(s) to archive %s%n", in.size(), dir);
        report.print(out, "  ");
        return 0;
    }

    /**
     * Applies record files, written under {@code input}'s schema (the archive's newest or an older registered
     * version), as one batch.
     *
     * @param rejectsFile where rejected records go as JSON lines, or null to only count them
     * @throws dev.onefold.OnefoldException (IO) naming a file that cannot be read; nothing is committed then
     */
    public static RunReport apply(ArchiveDirectory archive, AvroDataset input, List<Path> files, Path rejectsFile) {
        return apply(archive, input, files, rejectsFile, Progress.hidden());
    }

    static RunReport apply(ArchiveDirectory archive, AvroDataset input, List<Path> files, Path rejectsFile,
            Progress progress) {
        InputFiles.checkReadable(files);
        ArchiveDirectory.InputSchema reading = archive.inputSchema(input.schema());
        AvroRecordAccess newest = archive.dataset().access();
        try (InputFiles records = new InputFiles(files, (line, where) -> reading.parseRow(line, where, newest), newest,
                progress);
                RejectsFile rejects = RejectsFile.open(rejectsFile, archive.dataset().schema())) {
            ApplyReport r = archive.archive().apply(records, "input", rejects);
            progress.step("committed");
            return new RunReport(r.batch(), rejects.reasons(), RunReport.ArchiveSide.of(r, archive.archive().snapshot()));
        }
    }
}
