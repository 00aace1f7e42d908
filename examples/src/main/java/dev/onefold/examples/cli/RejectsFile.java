package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.avro.JsonLines;
import java.io.BufferedWriter;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.TreeMap;
import java.util.function.Consumer;
import org.apache.avro.Schema;

/**
 * Receives every rejected input record: counts it, tallies the reasons for the summary, and, when a file was
 * asked for, writes it as one JSON line:
 * <pre>{@code
 * {"file": "in.jsonl", "line": 7, "reason": "in.jsonl line 7: field 'seq': ...", "record": "<the line as read>"}
 * {"file": "in.avro", "index": 12, "reason": "...", "record": {...the record...}}
 * }</pre>
 * {@code line} is 1-based (JSON lines files), {@code index} the 0-based record position in an Avro container
 * file. {@code record} is the raw text when the record could not be read at all, otherwise the record as JSON.
 *
 * <p>Single-threaded. Cost: one JSON line per rejection.
 */
final class RejectsFile implements Consumer<Rejection>, AutoCloseable {
    /** Distinct reasons tallied before the rest are grouped, so hostile input cannot grow the tally without bound. */
    private static final int MAX_REASONS = 50;
    private static final String OTHER_REASONS = "(other reasons)";

    private final Path path;
    private final BufferedWriter out;
    private final JsonLines json;
    private final Map<String, Long> reasons = new TreeMap<>();
    private long count;

    private RejectsFile(Path path, Schema schema) {
        this.path = path;
        this.json = JsonLines.of(schema);
        if (path == null) {
            this.out = null;
        } else {
            try {
                Path dir = path.toAbsolutePath().getParent();
                Files.createDirectories(dir);
                this.out = Files.newBufferedWriter(path, StandardCharsets.UTF_8);
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, path + ": cannot write rejects: " + e.getMessage(), e);
            }
        }
    }

    /** Rejects written to {@code path}, or only counted when it is null. */
    static RejectsFile open(Path path, Schema schema) {
        return new RejectsFile(path, schema);
    }

    @Override
    public void accept(Rejection rejection) {
        count++;
        String reason = shortReason(rejection.reason());
        reasons.merge(reasons.size() < MAX_REASONS || reasons.containsKey(reason) ? reason : OTHER_REASONS, 1L, Long::sum);
        if (out == null) {
            return;
        }
        Map<String, Object> line = new LinkedHashMap<>();
        if (rejection.record() instanceof InputRecord r && r.file() != null) {
            line.put("file", r.file());
            line.put(r.line() > 0 ? "line" : "index", r.line() > 0 ? r.line() : r.index());
            line.put("reason", rejection.reason());
            line.put("record", r.row() != null ? new JsonText.Raw(json.writeRow(r.row())) : r.text());
        } else {
            line.put("file", rejection.source());
            line.put("index", rejection.position());
            line.put("reason", rejection.reason());
            line.put("record", rejection.record() == null ? null : String.valueOf(rejection.record()));
        }
        try {
            out.write(JsonText.write(line));
            out.write('\n');
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, path + ": cannot write rejects: " + e.getMessage(), e);
        }
    }

    /** The reason without the leading "file line N: " so equal causes group together in the summary. */
    static String shortReason(String reason) {
        int at = reason.indexOf(": ");
        String head = at < 0 ? "" : reason.substring(0, at);
        return head.matches(".* (line|record) \\d+") ? reason.substring(at + 2) : reason;
    }

    long count() {
        return count;
    }

    /** How many rejections had each reason (file and line removed), in reason order. */
    Map<String, Long> reasons() {
        return reasons;
    }

    @Override
    public void close() {
        if (out != null) {
            try {
                out.close();
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, path + ": cannot write rejects: " + e.getMessage(), e);
            }
        }
    }
}
