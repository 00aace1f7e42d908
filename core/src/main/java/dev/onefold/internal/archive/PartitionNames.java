package dev.onefold.internal.archive;

import dev.onefold.internal.hash.XxHash64;
import java.io.ByteArrayOutputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Optional;

/**
 * Turns partition values into one storage name step that cannot leave the archive directory and cannot collide.
 *
 * <pre>
 *  no values (unpartitioned)   _all
 *  one value per field         joined by ','
 *  null                        ~
 *  a string s                  '=' then s's UTF-8 bytes, each byte outside [A-Za-z0-9_-] as %XX (upper hex)
 *  longer than 120 chars       the first 96 chars, '#', 16 hex digits of XXH64 over the full name
 * </pre>
 * The encoding is injective on short names ('/', '\', '.', NUL and every non-ASCII byte are escaped, so "..",
 * "/" or an empty step cannot appear) and names are ASCII, at most 113 characters, safe on every common file
 * system. A hashed name does not decode; the manifest always stores the exact values. The hour, day and month
 * buckets need no escaping, so their names sort like their times. Stateless and thread-safe.
 */
public final class PartitionNames {
    static final int MAX_LENGTH = 120;
    private static final int KEEP = 96;
    private static final char[] HEX = "0123456789ABCDEF".toCharArray();

    private PartitionNames() {}

    public static String encode(List<String> values) {
        if (values.isEmpty()) {
            return "_all";
        }
        StringBuilder sb = new StringBuilder();
        for (int i = 0; i < values.size(); i++) {
            if (i > 0) {
                sb.append(',');
            }
            String v = values.get(i);
            if (v == null) {
                sb.append('~');
                continue;
            }
            sb.append('=');
            for (byte b : v.getBytes(StandardCharsets.UTF_8)) {
                int c = b & 0xFF;
                if ((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' || c == '-') {
                    sb.append((char) c);
                } else {
                    sb.append('%').append(HEX[c >>> 4]).append(HEX[c & 15]);
                }
            }
        }
        if (sb.length() <= MAX_LENGTH) {
            return sb.toString();
        }
        long h = XxHash64.hash(sb.toString().getBytes(StandardCharsets.US_ASCII));
        return sb.substring(0, KEEP) + "#" + String.format("%016x", h);
    }

    /** The values a short name stands for; empty for a hashed (long) name, which only the manifest can resolve. */
    public static Optional<List<String>> decode(String name) {
        if (name.equals("_all")) {
            return Optional.of(List.of());
        }
        if (name.indexOf('#') >= 0) {
            return Optional.empty();
        }
        List<String> out = new ArrayList<>();
        for (String part : name.split(",", -1)) {
            if (part.equals("~")) {
                out.add(null);
                continue;
            }
            if (!part.startsWith("=")) {
                throw new IllegalArgumentException("not a partition name: " + name);
            }
            ByteArrayOutputStream bytes = new ByteArrayOutputStream();
            for (int i = 1; i < part.length(); i++) {
                char c = part.charAt(i);
                if (c == '%') {
                    bytes.write(Integer.parseInt(part.substring(i + 1, i + 3), 16));
                    i += 2;
                } else {
                    bytes.write(c);
                }
            }
            out.add(bytes.toString(StandardCharsets.UTF_8));
        }
        return Optional.of(Collections.unmodifiableList(out));
    }
}
