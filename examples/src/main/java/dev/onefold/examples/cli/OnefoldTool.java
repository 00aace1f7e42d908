package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import dev.onefold.examples.demo.Demo;
import java.io.PrintStream;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.List;
import java.util.Set;

/**
 * The {@code onefold} command-line tool: {@code java -jar onefold.jar COMMAND [options]}. The commands, their
 * options and the exit statuses are a public contract that scripts and outside tests rely on:
 * <ul>
 *   <li>0: success;</li>
 *   <li>1: {@code reconcile} found a disagreement or {@code verify} found a problem;</li>
 *   <li>2: a usage error, a file that cannot be read, an invalid spec or schema, or any other error that stops
 *       the run, with a one-line reason on stderr naming the file and, where it applies, the line and field.</li>
 * </ul>
 * A bad record inside an input file is not an error of the run: it is rejected, counted and, with
 * {@code --rejects}, written out with its source and reason.
 *
 * <p>Each run is independent; {@link #run} may be called from tests and programs. Stateless.
 */
public final class OnefoldTool {
    static final int OK = 0;
    static final int FOUND_DIFFERENCES = 1;
    static final int FAILED = 2;

    private OnefoldTool() {}

    /** One command: its name, its options and its help text. */
    private enum Command {
        DEDUPE("dedupe", Set.of("spec", "schema", "out", "rejects", "report", "compression"), Set.of("in"), """
                usage: onefold dedupe --spec S.json --schema A.avsc --in FILE... --out FILE [--rejects FILE] [--report FILE]
                                      [--compression null|deflate|snappy|zstd]

                Deduplicates, merges and orders the records of the input files (one batch) and writes the survivors,
                one per key (one per sibling under vector-clock keep-all), in the spec's order.

                  --spec FILE      the dataset spec (JSON); may be left out when the schema embeds it ("onefold" attribute)
                  --schema FILE    the records' Avro schema (.avsc)
                  --in FILE...     input files: .jsonl (JSON lines) or .avro (Avro container files), read in order
                  --out FILE       output file, .jsonl or .avro by its ending; replaced only when the run succeeds
                  --rejects FILE   every rejected record as a JSON line: file, line (or index), reason, record
                  --report FILE    the counts as JSON: in, accepted, rejected, duplicates, superseded, conflicts,
                                   keys, keys_with_siblings, tombstones, out, spilled_runs, rejected_reasons
                  --compression    block compression of an .avro output (default deflate)
                """),
        APPLY("apply", Set.of("spec", "schema", "archive", "rejects", "report"), Set.of("in"), """
                usage: onefold apply --spec S.json --schema A.avsc --archive DIR --in FILE... [--rejects FILE] [--report FILE]

                Applies the records of the input files, as one batch, to the archive in DIR (created on first use):
                only the partitions the batch touches are rewritten, and one new version is committed atomically.
                Applying the same records again changes nothing. DIR keeps the schema versions in DIR/schemas/; a
                newer schema is accepted when it can read every earlier one and keeps the spec's fields.

                  --spec, --schema, --in, --rejects as for dedupe
                  --archive DIR    the archive directory
                  --report FILE    the dedupe counts plus version, partitions_touched, partitions_untouched,
                                   chunks_written, bytes_read, bytes_written, keys_moved, stored_superseded,
                                   tombstones_dropped, archive_partitions, archive_records
                """),
        EXPORT("export", Set.of("archive", "out", "partition", "version", "compression"), Set.of(), """
                usage: onefold export --archive DIR --out FILE [--partition P] [--version N]
                                      [--compression null|deflate|snappy|zstd]

                Writes the archive's visible records, in the spec's order across partitions, to FILE (.jsonl or .avro).

                  --partition P    only this partition: its value as verify and apply name it (for example 2031-05-04,
                                   or values joined by / for several partition fields)
                  --version N      an earlier version instead of the latest
                """),
        VERIFY("verify", Set.of("archive"), Set.of(), """
                usage: onefold verify --archive DIR

                Checks the archive: every manifest, and every chunk of the latest version (checksums, order, partition
                membership, key indexes, counts and digests, unique keys). Prints each problem with its file and exits
                with status 1 when there is any.
                """),
        RECONCILE("reconcile", Set.of("spec", "schema", "left", "right", "report", "deliveries"), Set.of(), """
                usage: onefold reconcile --spec S.json --schema A.avsc --left DIR|FILE --right DIR|FILE [--report FILE]
                                         [--deliveries left|right|both]

                Proves that two stores hold the same records: compares digests partition by partition and lists the keys
                that differ, with both versions. A side is an archive directory or a record file (.jsonl or .avro) read
                with the given spec and schema (they may be left out when both sides are archives). Exits with status 1
                when the sides disagree.

                  --report FILE    the full result as JSON ("status": "agree" or "disagree", totals, differing keys)
                  --deliveries     read that side's file as raw deliveries and fold them under the spec first; by default
                                   a file is taken as a store's content, one record per key
                """),
        DEMO("demo", Set.of("dir"), Set.of(), """
                usage: onefold demo [--dir DIR]

                Runs the whole job on generated data (a fictional fleet of refrigerated containers) in DIR
                (default ./onefold-demo): writes the inputs, applies several batches to archives, verifies them,
                reconciles them against an independently computed copy, and says which files to open next.
                """);

        final String name;
        final Set<String> single;
        final Set<String> multi;
        final String help;

        Command(String name, Set<String> single, Set<String> multi, String help) {
            this.name = name;
            this.single = single;
            this.multi = multi;
            this.help = help;
        }

        static Command named(String name) {
            for (Command c : values()) {
                if (c.name.equals(name)) {
                    return c;
                }
            }
            return null;
        }
    }

    private static final String OVERVIEW = """
            onefold: one correct, ordered copy of every record, from duplicated, replayed, late and concurrent deliveries.

            usage: java -jar onefold.jar COMMAND [options]

            commands:
              dedupe     deduplicate, merge and order record files into one file
              apply      apply record files as one batch to an archive directory
              export     write an archive's records, in order, to a file
              verify     check an archive's files, checksums, order and digests
              reconcile  prove two stores (archives or files) hold the same records, or name the keys that differ
              demo       run the whole job on generated data, in a directory you can look at afterwards
              help       this text; 'onefold COMMAND --help' describes one command

            record files: .jsonl (one JSON object per line) or .avro (Avro container file), chosen by the ending.
            exit status: 0 success, 1 reconcile disagreement or verify problem, 2 usage error, unreadable file,
            invalid spec or schema.
            """;

    public static void main(String[] args) {
        int status = run(args, System.out, System.err);
        System.out.flush();
        System.exit(status);
    }

    /** Runs one command line and returns the exit status; output goes to {@code out}, errors to {@code err}. */
    public static int run(String[] args, PrintStream out, PrintStream err) {
        if (args.length == 0) {
            err.print(OVERVIEW);
            return FAILED;
        }
        String name = args[0];
        if (name.equals("help") || name.equals("--help") || name.equals("-h")) {
            if (args.length > 1 && Command.named(args[1]) != null) {
                out.print(Command.named(args[1]).help);
            } else {
                out.print(OVERVIEW);
            }
            return OK;
        }
        Command command = Command.named(name);
        if (command == null) {
            err.println("onefold: unknown command '" + name + "' (commands: dedupe, apply, export, verify, reconcile, demo, "
                    + "help)");
            return FAILED;
        }
        List<String> rest = Arrays.asList(args).subList(1, args.length);
        if (rest.contains("--help") || rest.contains("-h")) {
            out.print(command.help);
            return OK;
        }
        try {
            CommandLine cl = CommandLine.parse(command.name, rest, command.single, command.multi);
            return switch (command) {
                case DEDUPE -> DedupeCommand.run(cl, out, err);
                case APPLY -> ApplyCommand.run(cl, out, err);
                case EXPORT -> ExportCommand.run(cl, out);
                case VERIFY -> VerifyCommand.run(cl, out);
                case RECONCILE -> ReconcileCommand.run(cl, out);
                case DEMO -> Demo.run(cl.has("dir") ? cl.requiredPath("dir") : Path.of("onefold-demo"), out) ? OK
                        : FOUND_DIFFERENCES;
            };
        } catch (OnefoldException e) {
            err.println("onefold " + command.name + ": " + oneLine(e.getMessage()));
            return FAILED;
        } catch (RuntimeException e) {
            // not a condition the tool knows (a bug, or a failure below the library): still one line and status 2;
            // ONEFOLD_DEBUG=1 adds the stack trace for a report
            err.println("onefold " + command.name + ": unexpected " + e.getClass().getSimpleName() + ": " + oneLine(e.getMessage()));
            if (System.getenv("ONEFOLD_DEBUG") != null) {
                e.printStackTrace(err);
            }
            return FAILED;
        }
    }

    /** Folds a message onto one line, so scripts can read stderr line by line. */
    static String oneLine(String message) {
        return message == null ? "(no message)" : message.replaceAll("\\s*[\\r\\n]+\\s*", " ").strip();
    }
}
