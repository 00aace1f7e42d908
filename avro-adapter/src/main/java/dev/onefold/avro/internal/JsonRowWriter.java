package dev.onefold.avro.internal;

import dev.onefold.internal.json.Json;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.nio.ByteBuffer;
import java.time.Instant;
import java.time.LocalDate;
import java.util.Base64;
import java.util.List;
import java.util.Map;

/**
 * Writes a {@link Row} as one line of compact JSON in the plain form {@link JsonValues} documents (null for an
 * empty field, ISO-8601 text for timestamps and dates, base64 for bytes, "NaN", "Infinity", "-Infinity" and
 * "-0.0" as strings, maps as objects in key order), straight into a {@link StringBuilder}: no maps or lists are
 * built on the way.
 *
 * <p>Stateless and thread-safe. Cost: linear in the row's size; timestamps and dates in years 0 to 9999 are
 * printed digit by digit instead of through {@code java.time}'s formatter.
 */
public final class JsonRowWriter {
    private JsonRowWriter() {}

    /** Appends the row's JSON object (no line break). */
    public static void write(Row row, StringBuilder sb) {
        RowSchema schema = row.schema();
        sb.append('{');
        for (int i = 0; i < schema.size(); i++) {
            if (i > 0) {
                sb.append(',');
            }
            RowSchema.Field f = schema.field(i);
            Json.quote(f.name(), sb);
            sb.append(':');
            value(f.type(), row.get(i), sb);
        }
        sb.append('}');
    }

    private static void value(FieldType type, Object v, StringBuilder sb) {
        if (v == null) {
            sb.append("null");
            return;
        }
        switch (type.kind()) {
            case BOOLEAN -> sb.append((boolean) (Boolean) v);
            case INT -> sb.append((int) (Integer) v);
            case LONG -> sb.append((long) (Long) v);
            case DECIMAL -> sb.append(v.toString());
            case FLOAT, DOUBLE -> {
                // NaN, the infinities and -0.0 have no JSON number: they are written as their Java text in quotes
                double d = ((Number) v).doubleValue();
                if (Double.isFinite(d) && !(d == 0 && 1 / d < 0)) {
                    sb.append(v.toString());
                } else {
                    Json.quote(v.toString(), sb);
                }
            }
            case STRING -> Json.quote((String) v, sb);
            case UUID -> sb.append('"').append(v).append('"');
            case BYTES -> {
                ByteBuffer b = ((ByteBuffer) v).duplicate();
                byte[] a = new byte[b.remaining()];
                b.get(a);
                sb.append('"').append(Base64.getEncoder().encodeToString(a)).append('"');
            }
            case TIMESTAMP_MILLIS -> instant(Math.floorDiv((Long) v, 1000L), (int) Math.floorMod((Long) v, 1000L) * 1_000_000, sb);
            case TIMESTAMP_MICROS -> instant(Math.floorDiv((Long) v, 1_000_000L),
                    (int) Math.floorMod((Long) v, 1_000_000L) * 1000, sb);
            case DATE -> {
                sb.append('"');
                date((Integer) v, sb);
                sb.append('"');
            }
            case LIST -> {
                sb.append('[');
                boolean first = true;
                for (Object o : (List<?>) v) {
                    if (!first) {
                        sb.append(',');
                    }
                    first = false;
                    value(type.element(), o, sb);
                }
                sb.append(']');
            }
            case MAP -> {
                sb.append('{');
                boolean first = true;
                for (Map.Entry<?, ?> e : ((Map<?, ?>) v).entrySet()) {
                    if (!first) {
                        sb.append(',');
                    }
                    first = false;
                    Json.quote((String) e.getKey(), sb);
                    sb.append(':');
                    value(type.element(), e.getValue(), sb);
                }
                sb.append('}');
            }
            case RECORD -> write((Row) v, sb);
            default -> throw new AssertionError(type);
        }
    }

    /** As {@code Instant.toString()}: seconds always, the fraction in groups of three digits as needed. */
    private static void instant(long seconds, int nanos, StringBuilder sb) {
        long days = Math.floorDiv(seconds, 86_400L);
        if (days < MIN_FAST_DAY || days > MAX_FAST_DAY) {
            Json.quote(Instant.ofEpochSecond(seconds, nanos).toString(), sb);
            return;
        }
        int secondOfDay = (int) Math.floorMod(seconds, 86_400L);
        sb.append('"');
        date((int) days, sb);
        sb.append('T');
        two(secondOfDay / 3600, sb);
        sb.append(':');
        two(secondOfDay / 60 % 60, sb);
        sb.append(':');
        two(secondOfDay % 60, sb);
        if (nanos != 0) {
            sb.append('.');
            if (nanos % 1_000_000 == 0) {
                digits(nanos / 1_000_000, 3, sb);
            } else if (nanos % 1000 == 0) {
                digits(nanos / 1000, 6, sb);
            } else {
                digits(nanos, 9, sb);
            }
        }
        sb.append("Z\"");
    }

    /** 0000-01-01 and 9999-12-31 as days since 1970-01-01: between them ISO-8601 needs no sign or extra digits. */
    private static final long MIN_FAST_DAY = LocalDate.of(0, 1, 1).toEpochDay();
    private static final long MAX_FAST_DAY = LocalDate.of(9999, 12, 31).toEpochDay();

    /** As {@code LocalDate.toString()}. */
    private static void date(int epochDay, StringBuilder sb) {
        if (epochDay < MIN_FAST_DAY || epochDay > MAX_FAST_DAY) {
            sb.append(LocalDate.ofEpochDay(epochDay));
            return;
        }
        // civil date from a day count in 400-year eras of 146097 days, years starting in March (common practice)
        long z = epochDay + 719_468L;
        long era = Math.floorDiv(z, 146_097L);
        long doe = z - era * 146_097L;
        long yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
        long doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
        long mp = (5 * doy + 2) / 153;
        int day = (int) (doy - (153 * mp + 2) / 5 + 1);
        int month = (int) (mp < 10 ? mp + 3 : mp - 9);
        int year = (int) (yoe + era * 400 + (month <= 2 ? 1 : 0));
        digits(year, 4, sb);
        sb.append('-');
        two(month, sb);
        sb.append('-');
        two(day, sb);
    }

    private static void two(int v, StringBuilder sb) {
        sb.append((char) ('0' + v / 10)).append((char) ('0' + v % 10));
    }

    /** {@code v} (non-negative, below 10^width) as exactly {@code width} digits. */
    private static void digits(int v, int width, StringBuilder sb) {
        for (int unit = POWERS_OF_TEN[width - 1]; unit > 0; unit /= 10) {
            sb.append((char) ('0' + v / unit % 10));
        }
    }

    private static final int[] POWERS_OF_TEN = {1, 10, 100, 1000, 10_000, 100_000, 1_000_000, 10_000_000, 100_000_000};
}
