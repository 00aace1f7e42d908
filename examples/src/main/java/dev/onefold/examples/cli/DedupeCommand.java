package dev.onefold.examples.cli;

import dev.onefold.BatchEngine;
import dev.onefold.BatchReport;
import dev.onefold.avro.AvroDataset;
import dev.onefold.avro.ContainerFiles;
import dev.onefold.avro.JsonLines;
import java.io.PrintStream;
import java.nio.file.Path;
import java.util.List;

/**
 * {@code onefold dedupe}: deduplicates, merges and orders record files into one output file, streaming: input
 * is parsed ahead on worker threads, survivors are written as the engine emits them (spilling to disk past the
 * memory budget), rejects as they are found. Stateless.
 */
final class DedupeCommand {
    private DedupeCommand() {}

    static int run(CommandLine cl, PrintStream out, PrintStream err) {
        List<Path> in = cl.requiredPaths("in");
        Path outFile = cl.requiredPath("out");
        FileFormat.of(outFile);
        ContainerFiles.Compression compression = compression(cl);
        InputFiles.checkReadable(in);
        AvroDataset dataset = DatasetFiles.read(cl.requiredPath("schema"), cl.optionalPath("spec"));
        BatchEngine<InputRecord> engine = BatchEngine.builder(dataset.spec(), InputRecord.access(dataset.access().schema()))
                .build();
        Progress progress = Progress.onTerminal(err, "merging, sorting and writing");
        RunReport report;
        JsonLines lines = JsonLines.of(dataset.schema());
        try (InputFiles input = new InputFiles(in, lines::parseRow, dataset.access(), progress); RejectsFile rejects = RejectsFile.open(cl.optionalPath("rejects"), dataset.schema());
                OutputFile output = OutputFile.create(outFile, dataset.schema(), compression)) {
            BatchReport batch = engine.dedupe(input, "input", r -> output.write(r.row()), rejects);
            output.commit();
            report = new RunReport(batch, rejects.reasons(), null);
        } finally {
            progress.done();
        }
        report.writeTo(cl.optionalPath("report"));
        out.printf("dedupe: wrote %,d records to %s%n", report.batch().out(), outFile);
        report.print(out, "  ");
        return 0;
    }

    /** The {@code --compression} of an .avro output (default deflate, which needs no native library). */
    static ContainerFiles.Compression compression(CommandLine cl) {
        String name = cl.optional("compression");
        return name == null ? ContainerFiles.Compression.DEFLATE : ContainerFiles.Compression.fromName(name);
    }
}
