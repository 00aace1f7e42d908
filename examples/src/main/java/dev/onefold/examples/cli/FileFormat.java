package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import java.nio.file.Path;
import java.util.Locale;

/** The record file formats the tool reads and writes, chosen by the file name's ending. */
enum FileFormat {
    /** One JSON object per line ({@code .jsonl}). */
    JSON_LINES,
    /** An Avro object container file ({@code .avro}). */
    AVRO;

    /**
     * The format of a file.
     *
     * @throws OnefoldException (USAGE) naming the file when its name ends in neither {@code .jsonl} nor {@code .avro}
     */
    static FileFormat of(Path file) {
        String name = file.getFileName() == null ? "" : file.getFileName().toString().toLowerCase(Locale.ROOT);
        if (name.endsWith(".jsonl")) {
            return JSON_LINES;
        }
        if (name.endsWith(".avro")) {
            return AVRO;
        }
        throw OnefoldException.usage(file + ": unknown file type; record files must end in .jsonl (JSON lines) or .avro "
                + "(Avro container file)");
    }
}
