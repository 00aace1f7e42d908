package dev.onefold.avro.internal;

import dev.onefold.internal.json.Json;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.math.BigDecimal;
import java.math.RoundingMode;
import java.nio.ByteBuffer;
import java.time.DateTimeException;
import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Base64;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.UUID;
import org.apache.avro.LogicalType;
import org.apache.avro.LogicalTypes;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericEnumSymbol;

/**
 * Reads one JSON line straight into a {@link Row} of the row schema {@link SchemaMapping} gives for an Avro
 * record schema, in one pass over the characters and without building JSON maps, Avro records or
 * {@code BigDecimal}s for non-decimal numbers.
 *
 * <p>It is the fast path of {@code JsonLines}, not a second definition of the format: {@link #read} returns a
 * row only for lines it reads with certainty to the same row the generic path ({@code Json} then
 * {@link JsonValues} then {@link SchemaMapping}) would give, and returns null for everything else — every
 * malformed or non-conforming line (so error messages keep coming from the generic path, which names the
 * position, field and reason) and a few rare shapes: a union value in Avro's tagged form whose branch is a
 * record or map, a missing field whose default is neither a plain scalar nor an empty array or map, numbers
 * whose exponent runs past nine characters, decimals far beyond their type, and schemas nested more than
 * {@value #MAX_SCHEMA_DEPTH} deep. The caller then runs the generic path on that line.
 *
 * <p>Immutable and thread-safe: the reader tree is built once per schema; each call keeps its position in a
 * cursor of its own. Cost: linear in the line's length.
 */
public final class JsonRowReader {
    /**
     * Schemas nested deeper than this are left to the generic path: its JSON reader refuses nesting deeper than
     * 512, and Avro's tagged union form can double a schema's depth in JSON.
     */
    private static final int MAX_SCHEMA_DEPTH = 256;

    private final RecordReader root;

    private JsonRowReader(RecordReader root) {
        this.root = root;
    }

    /** A reader for lines of {@code schema}; {@code rows} is the row schema SchemaMapping maps it to. */
    public static JsonRowReader of(Schema schema, RowSchema rows) {
        return new JsonRowReader(depth(schema) > MAX_SCHEMA_DEPTH ? null : (RecordReader) build(schema, FieldType.record(rows)));
    }

    /** Levels of JSON objects and arrays a value of the schema spans. */
    private static int depth(Schema s) {
        return switch (s.getType()) {
            case UNION -> s.getTypes().stream().mapToInt(JsonRowReader::depth).max().orElse(0);
            case RECORD -> 1 + s.getFields().stream().mapToInt(f -> depth(f.schema())).max().orElse(0);
            case ARRAY -> 1 + depth(s.getElementType());
            case MAP -> 1 + depth(s.getValueType());
            default -> 0;
        };
    }

    /** The line as a row, or null when the generic path must decide (an error, or a shape read there only). */
    public Row read(String line) {
        if (root == null) {
            return null;
        }
        Cursor c = new Cursor(line);
        try {
            c.skipSpace();
            if (c.peek() != '{') {
                return null;
            }
            Row row = (Row) root.read(c);
            c.skipSpace();
            return c.pos == line.length() ? row : null;
        } catch (Declined e) {
            return null;
        }
    }

    private static ValueReader build(Schema s, FieldType type) {
        switch (s.getType()) {
            case UNION: {
                Schema branch = SpecChecks.nonNull(s);
                return new UnionReader(build(branch, type), type.isNullable(), tag(branch),
                        branch.getType() == Schema.Type.RECORD || branch.getType() == Schema.Type.MAP);
            }
            case RECORD: {
                RowSchema rows = type.recordSchema();
                List<Schema.Field> fields = s.getFields();
                ValueReader[] children = new ValueReader[fields.size()];
                Object[] missing = new Object[fields.size()];
                for (int i = 0; i < children.length; i++) {
                    children[i] = build(fields.get(i).schema(), rows.field(i).type());
                    missing[i] = missing(fields.get(i), rows.field(i).type());
                }
                return new RecordReader(rows, fields.stream().map(Schema.Field::name).toArray(String[]::new), children, missing);
            }
            case ARRAY:
                return new ArrayReader(build(s.getElementType(), type.element()));
            case MAP:
                return new MapReader(build(s.getValueType(), type.element()));
            case ENUM:
                return new EnumReader(s.getEnumSymbols());
            default:
                return scalar(s, type);
        }
    }

    /** The name Avro's JSON encoding uses for a union branch (as {@link JsonValues} reads it). */
    private static String tag(Schema branch) {
        return switch (branch.getType()) {
            case RECORD, ENUM, FIXED -> branch.getFullName();
            default -> branch.getType().getName();
        };
    }

    /** What a missing field reads as: its default as a row value, null, or {@link #DECLINE}. */
    private static Object missing(Schema.Field f, FieldType type) {
        if (!f.hasDefaultValue()) {
            return SpecChecks.isNullableUnion(f.schema()) ? null : DECLINE;
        }
        Object d = GenericData.get().getDefaultValue(f);
        if (d == null) {
            return type.isNullable() ? null : DECLINE;
        }
        boolean plain = switch (type.kind()) {
            case BOOLEAN -> d instanceof Boolean;
            case INT, DATE -> d instanceof Integer;
            case LONG, TIMESTAMP_MILLIS, TIMESTAMP_MICROS -> d instanceof Long;
            case FLOAT -> d instanceof Float;
            case DOUBLE -> d instanceof Double;
            case LIST -> d instanceof List<?> list && list.isEmpty();
            case MAP -> d instanceof Map<?, ?> map && map.isEmpty();
            case STRING -> d instanceof CharSequence && SpecChecks.nonNull(f.schema()).getType() == Schema.Type.STRING
                    || d instanceof GenericEnumSymbol<?>;
            default -> false;
        };
        return plain ? Row.normalize(type, d instanceof GenericEnumSymbol<?> ? d.toString() : d, f.name()) : DECLINE;
    }

    private static ValueReader scalar(Schema s, FieldType type) {
        LogicalType lt = s.getLogicalType();
        switch (type.kind()) {
            case BOOLEAN:
                return c -> c.bool();
            case INT:
                return c -> c.intValue();
            case LONG:
                return c -> c.longValue();
            case FLOAT:
                return c -> (float) c.floating();
            case DOUBLE:
                return c -> c.floating();
            case STRING:
                return c -> c.string();
            case DATE:
                return c -> c.peek() == '"' ? Dates.days(c.string()) : c.intValue();
            case TIMESTAMP_MILLIS:
                return c -> c.peek() == '"' ? Dates.epoch(c.string(), 1000L) : c.longValue();
            case TIMESTAMP_MICROS:
                return c -> c.peek() == '"' ? Dates.epoch(c.string(), 1_000_000L) : c.longValue();
            case UUID:
                return c -> uuid(c.string());
            case DECIMAL:
                return new DecimalReader((LogicalTypes.Decimal) lt, s.getType() == Schema.Type.FIXED ? s.getFixedSize() : -1);
            case BYTES: {
                int size = s.getType() == Schema.Type.FIXED ? s.getFixedSize() : -1;
                return c -> {
                    byte[] b;
                    try {
                        b = Base64.getDecoder().decode(c.string());
                    } catch (IllegalArgumentException e) {
                        throw DECLINED;
                    }
                    if (size >= 0 && b.length != size) {
                        throw DECLINED;
                    }
                    return ByteBuffer.wrap(b);
                };
            }
            default:
                throw new AssertionError(type);
        }
    }

    private static UUID uuid(String text) {
        try {
            UUID u = UUID.fromString(text);
            if (u.toString().equalsIgnoreCase(text)) {
                return u;
            }
        } catch (IllegalArgumentException e) {
            // declined below: the generic path names the field and the reason
        }
        throw DECLINED;
    }

    /** Marks a missing field the fast path does not fill; never a row value. */
    private static final Object DECLINE = new Object();

    /** Thrown, without a stack, to hand a line back to the generic path. */
    private static final class Declined extends RuntimeException {
        private static final long serialVersionUID = 1L;

        Declined() {
            super("declined by the fast JSON line reader", null, false, false);
        }
    }

    private static final Declined DECLINED = new Declined();

    /** Reads one value whose first character is the cursor's (spaces already skipped). */
    @FunctionalInterface
    private interface ValueReader {
        Object read(Cursor c);
    }

    private static final class UnionReader implements ValueReader {
        private final ValueReader branch;
        private final boolean nullable;
        private final String tag;
        private final boolean branchIsObject;

        UnionReader(ValueReader branch, boolean nullable, String tag, boolean branchIsObject) {
            this.branch = branch;
            this.nullable = nullable;
            this.tag = tag;
            this.branchIsObject = branchIsObject;
        }

        @Override
        public Object read(Cursor c) {
            char first = c.peek();
            if (first == 'n' && nullable) {
                c.literal("null");
                return null;
            }
            if (first != '{') {
                return branch.read(c);
            }
            if (branchIsObject) {
                // an object whose first key is the tag may be Avro's tagged form: the generic path tells
                if (c.firstKeyIs(tag)) {
                    throw DECLINED;
                }
                return branch.read(c);
            }
            if (!c.open('{', '}') || !c.keyIs(tag)) {
                throw DECLINED;
            }
            c.colon();
            Object v = branch.read(c);
            if (c.more('}')) {
                throw DECLINED; // a second key: not the tagged form
            }
            return v;
        }
    }

    private static final class RecordReader implements ValueReader {
        private final RowSchema rows;
        private final String[] names;
        private final ValueReader[] children;
        private final Object[] missing;
        private final Map<String, Integer> positions = new HashMap<>();

        RecordReader(RowSchema rows, String[] names, ValueReader[] children, Object[] missing) {
            this.rows = rows;
            this.names = names;
            this.children = children;
            this.missing = missing;
            for (int i = 0; i < names.length; i++) {
                positions.put(names[i], i);
            }
        }

        @Override
        public Object read(Cursor c) {
            if (c.peek() == 'n') {
                throw DECLINED; // null for a field that is not nullable
            }
            int n = children.length;
            Object[] values = new Object[n];
            boolean[] seen = new boolean[n];
            if (c.open('{', '}')) {
                int expected = 0;
                do {
                    int i = field(c, expected);
                    if (seen[i]) {
                        throw DECLINED; // a duplicate key
                    }
                    seen[i] = true;
                    c.colon();
                    values[i] = children[i].read(c);
                    expected = i + 1 < n ? i + 1 : 0;
                } while (c.more('}'));
            }
            for (int i = 0; i < n; i++) {
                if (!seen[i]) {
                    if (missing[i] == DECLINE) {
                        throw DECLINED;
                    }
                    values[i] = missing[i];
                }
            }
            return Row.of(rows, values);
        }

        /** The position of the key at the cursor, trying the field after the previous one first (lines are usually in schema order). */
        private int field(Cursor c, int expected) {
            if (c.keyIs(names[expected])) {
                return expected;
            }
            Integer p = positions.get(c.key());
            if (p == null) {
                throw DECLINED; // an unknown field
            }
            return p;
        }
    }

    private static final class ArrayReader implements ValueReader {
        private final ValueReader element;

        ArrayReader(ValueReader element) {
            this.element = element;
        }

        @Override
        public Object read(Cursor c) {
            List<Object> out = new ArrayList<>();
            if (c.open('[', ']')) {
                do {
                    out.add(element.read(c));
                } while (c.more(']'));
            }
            return out;
        }
    }

    private static final class MapReader implements ValueReader {
        private final ValueReader value;

        MapReader(ValueReader value) {
            this.value = value;
        }

        @Override
        public Object read(Cursor c) {
            Map<String, Object> out = new HashMap<>();
            if (c.open('{', '}')) {
                do {
                    String key = c.key();
                    if (out.containsKey(key)) {
                        throw DECLINED; // a duplicate key
                    }
                    c.colon();
                    out.put(key, value.read(c));
                } while (c.more('}'));
            }
            return out;
        }
    }

    private static final class EnumReader implements ValueReader {
        private final Set<String> symbols;

        EnumReader(List<String> symbols) {
            this.symbols = new HashSet<>(symbols);
        }

        @Override
        public Object read(Cursor c) {
            String s = c.string();
            if (!symbols.contains(s)) {
                throw DECLINED;
            }
            return s;
        }
    }

    private static final class DecimalReader implements ValueReader {
        private final LogicalTypes.Decimal decimal;
        private final int fixedSize;

        DecimalReader(LogicalTypes.Decimal decimal, int fixedSize) {
            this.decimal = decimal;
            this.fixedSize = fixedSize;
        }

        @Override
        public Object read(Cursor c) {
            String text = c.peek() == '"' ? c.string() : c.numberText();
            BigDecimal v;
            try {
                v = new BigDecimal(text);
                if (v.precision() - v.scale() > decimal.getPrecision() || v.scale() - decimal.getScale() > JsonValues.ABSURD_DIGITS) {
                    throw DECLINED; // too large, or maybe too fine: left to the generic path, which refuses it without rescaling
                }
                v = v.setScale(decimal.getScale(), RoundingMode.UNNECESSARY);
            } catch (NumberFormatException | ArithmeticException e) {
                throw DECLINED;
            }
            if (v.precision() > decimal.getPrecision()
                    || fixedSize >= 0 && v.unscaledValue().toByteArray().length > fixedSize) {
                throw DECLINED;
            }
            return v;
        }
    }

    /** Timestamps and dates in the four-digit-year ISO-8601 form {@code Instant} and {@code LocalDate} print. */
    private static final class Dates {
        private Dates() {}

        static int days(String text) {
            if (text.length() != 10 || text.charAt(4) != '-' || text.charAt(7) != '-') {
                return slowDays(text);
            }
            int y = digits(text, 0, 4);
            int m = digits(text, 5, 7);
            int d = digits(text, 8, 10);
            if (y < 0 || m < 0 || d < 0) {
                return slowDays(text);
            }
            try {
                return (int) LocalDate.of(y, m, d).toEpochDay();
            } catch (DateTimeException e) {
                throw DECLINED;
            }
        }

        private static int slowDays(String text) {
            try {
                return Math.toIntExact(LocalDate.parse(text).toEpochDay());
            } catch (DateTimeException | ArithmeticException e) {
                throw DECLINED;
            }
        }

        /**
         * {@code yyyy-MM-ddTHH:mm:ss[.f{1,9}]Z} in units of {@code 1/perSecond} s; anything else goes through
         * {@code Instant.parse}. An instant finer than the unit, or out of range, is declined.
         */
        static long epoch(String text, long perSecond) {
            int len = text.length();
            if (len < 20 || text.charAt(4) != '-' || text.charAt(7) != '-' || text.charAt(10) != 'T' || text.charAt(13) != ':'
                    || text.charAt(16) != ':' || text.charAt(len - 1) != 'Z') {
                return slowEpoch(text, perSecond);
            }
            int y = digits(text, 0, 4);
            int mo = digits(text, 5, 7);
            int d = digits(text, 8, 10);
            int h = digits(text, 11, 13);
            int mi = digits(text, 14, 16);
            int s = digits(text, 17, 19);
            int nanos = 0;
            if (len > 20) {
                int fraction = len - 21;
                if (text.charAt(19) != '.' || fraction < 1 || fraction > 9) {
                    return slowEpoch(text, perSecond);
                }
                nanos = digits(text, 20, len - 1);
                for (int i = fraction; i < 9 && nanos >= 0; i++) {
                    nanos *= 10;
                }
            }
            if (y < 0 || mo < 0 || d < 0 || h < 0 || h > 23 || mi < 0 || mi > 59 || s < 0 || s > 59 || nanos < 0) {
                return slowEpoch(text, perSecond);
            }
            long day;
            try {
                day = LocalDate.of(y, mo, d).toEpochDay();
            } catch (DateTimeException e) {
                throw DECLINED;
            }
            return units(day * 86_400L + h * 3600L + mi * 60L + s, nanos, perSecond);
        }

        private static long slowEpoch(String text, long perSecond) {
            Instant t;
            try {
                t = Instant.parse(text);
            } catch (DateTimeException e) {
                throw DECLINED;
            }
            return units(t.getEpochSecond(), t.getNano(), perSecond);
        }

        private static long units(long seconds, int nanos, long perSecond) {
            long unitNanos = 1_000_000_000L / perSecond;
            if (nanos % unitNanos != 0) {
                throw DECLINED;
            }
            try {
                return EpochUnits.of(Instant.ofEpochSecond(seconds, nanos), perSecond);
            } catch (ArithmeticException e) {
                throw DECLINED;
            }
        }

        /** The ASCII digits text[from, to) as a number, or -1 when one is not a digit. */
        private static int digits(String text, int from, int to) {
            int v = 0;
            for (int i = from; i < to; i++) {
                char ch = text.charAt(i);
                if (ch < '0' || ch > '9') {
                    return -1;
                }
                v = v * 10 + (ch - '0');
            }
            return v;
        }
    }

    /** 1e0 to 1e22: every one an exact double. */
    private static final double[] POWERS_OF_TEN = new double[23];

    static {
        POWERS_OF_TEN[0] = 1;
        for (int i = 1; i < POWERS_OF_TEN.length; i++) {
            POWERS_OF_TEN[i] = POWERS_OF_TEN[i - 1] * 10;
        }
    }

    /**
     * A position in one line, with the token readers. Follows the grammar {@code dev.onefold.internal.json.Json}
     * accepts (RFC 8259, plus leading zeros, which it also reads); anything else declines.
     */
    private static final class Cursor {
        private final String text;
        int pos;

        Cursor(String text) {
            this.text = text;
        }

        char peek() {
            if (pos >= text.length()) {
                throw DECLINED;
            }
            return text.charAt(pos);
        }

        char next() {
            char ch = peek();
            pos++;
            return ch;
        }

        void expect(char ch) {
            if (next() != ch) {
                throw DECLINED;
            }
        }

        void skipSpace() {
            while (pos < text.length()) {
                char ch = text.charAt(pos);
                if (ch == ' ' || ch == '\t' || ch == '\n' || ch == '\r') {
                    pos++;
                } else {
                    return;
                }
            }
        }

        /**
         * Moves past {@code open} and the spaces after it; false when the container is empty (then also past
         * {@code close}).
         */
        boolean open(char open, char close) {
            expect(open);
            skipSpace();
            if (peek() == close) {
                pos++;
                return false;
            }
            return true;
        }

        /** After an element: true past a comma and spaces (another element follows), false past {@code close}. */
        boolean more(char close) {
            skipSpace();
            char ch = next();
            if (ch == ',') {
                skipSpace();
                return true;
            }
            if (ch != close) {
                throw DECLINED;
            }
            return false;
        }

        /** Moves past the colon after a key and the spaces around it. */
        void colon() {
            skipSpace();
            expect(':');
            skipSpace();
        }

        void literal(String word) {
            if (!text.startsWith(word, pos)) {
                throw DECLINED;
            }
            pos += word.length();
        }

        Boolean bool() {
            char ch = peek();
            if (ch == 't') {
                literal("true");
                return Boolean.TRUE;
            }
            literal("false");
            return Boolean.FALSE;
        }

        /** Whether the string at the cursor is exactly {@code name} written without escapes; moves past it if so. */
        boolean keyIs(String name) {
            int end = pos + 1 + name.length();
            if (peek() == '"' && end < text.length() && text.charAt(end) == '"' && text.startsWith(name, pos + 1)) {
                pos = end + 1;
                return true;
            }
            return false;
        }

        /** Whether the object at the cursor starts with the key {@code name}; does not move. */
        boolean firstKeyIs(String name) {
            int start = pos;
            pos++;
            skipSpace();
            boolean is = pos < text.length() && text.charAt(pos) == '"' && key().equals(name);
            pos = start;
            return is;
        }

        String key() {
            return string();
        }

        String string() {
            if (peek() != '"') {
                throw DECLINED;
            }
            int start = ++pos;
            int n = text.length();
            while (pos < n) {
                char ch = text.charAt(pos);
                if (ch == '"') {
                    return text.substring(start, pos++);
                }
                if (ch == '\\') {
                    return escaped(start);
                }
                if (ch < 0x20) {
                    throw DECLINED;
                }
                pos++;
            }
            throw DECLINED;
        }

        private String escaped(int start) {
            StringBuilder sb = new StringBuilder(pos - start + 16).append(text, start, pos);
            while (true) {
                char ch = next();
                if (ch == '"') {
                    return sb.toString();
                }
                if (ch < 0x20) {
                    throw DECLINED;
                }
                if (ch != '\\') {
                    sb.append(ch);
                    continue;
                }
                char e = next();
                int unescaped = e == 'u' ? hex4() : Json.unescape(e);
                if (unescaped < 0) {
                    throw DECLINED;
                }
                sb.append((char) unescaped);
            }
        }

        private int hex4() {
            if (pos + 4 > text.length()) {
                throw DECLINED;
            }
            int v = 0;
            for (int i = 0; i < 4; i++) {
                int d = Character.digit(text.charAt(pos + i), 16);
                if (d < 0) {
                    throw DECLINED;
                }
                v = v * 16 + d;
            }
            pos += 4;
            return v;
        }

        /** Moves past one JSON number (the grammar {@link Json#numberEnd} reads); returns whether it is an integer. */
        private boolean number() {
            int start = pos;
            int end = Json.numberEnd(text, start);
            if (end < 0) {
                throw DECLINED;
            }
            pos = end;
            boolean integral = true;
            for (int i = start; i < end; i++) {
                char ch = text.charAt(i);
                if (ch == 'e' || ch == 'E') {
                    if (end - i > 10) {
                        throw DECLINED; // maybe an exponent the generic reader's BigDecimal cannot hold
                    }
                    return false;
                }
                integral &= ch != '.';
            }
            return integral;
        }

        String numberText() {
            int start = pos;
            number();
            return text.substring(start, pos);
        }

        /** A JSON integer within the range of long. */
        long longValue() {
            int start = pos;
            char first = peek();
            if (first != '-' && (first < '0' || first > '9')) {
                throw DECLINED;
            }
            if (!number()) {
                throw DECLINED;
            }
            // accumulate negatively so Long.MIN_VALUE fits
            boolean negative = first == '-';
            long v = 0;
            for (int i = negative ? start + 1 : start; i < pos; i++) {
                int d = text.charAt(i) - '0';
                if (v < (Long.MIN_VALUE + d) / 10) {
                    throw DECLINED;
                }
                v = v * 10 - d;
            }
            if (!negative) {
                if (v == Long.MIN_VALUE) {
                    throw DECLINED;
                }
                v = -v;
            }
            return v;
        }

        Integer intValue() {
            long v = longValue();
            if (v != (int) v) {
                throw DECLINED;
            }
            return (int) v;
        }

        /** A JSON number, or one of the strings "NaN", "Infinity", "-Infinity", "-0.0", as the generic path reads them. */
        double floating() {
            char first = peek();
            if (first == '"') {
                switch (string()) {
                    case "NaN": return Double.NaN;
                    case "Infinity": return Double.POSITIVE_INFINITY;
                    case "-Infinity": return Double.NEGATIVE_INFINITY;
                    case "-0.0": return -0.0;
                    default: throw DECLINED;
                }
            }
            if (first != '-' && (first < '0' || first > '9')) {
                throw DECLINED;
            }
            int start = pos;
            number();
            double d = exactDouble(start);
            if (Double.isNaN(d)) {
                d = Double.parseDouble(text.substring(start, pos));
            }
            // the generic path goes through Long or BigDecimal, which have no negative zero: -0 and -0.0 read as 0.0,
            // while a negative number too small for a double still rounds to -0.0
            return d == 0 && zeroMantissa(start) ? 0.0 : d;
        }

        /**
         * The number text[start, pos) when its digits and its power of ten are both exact doubles, so one
         * multiplication or division rounds it correctly (Clinger's fast path, common practice); NaN otherwise.
         */
        private double exactDouble(int start) {
            int i = start;
            boolean negative = text.charAt(i) == '-';
            if (negative) {
                i++;
            }
            long digits = 0;
            int significant = 0;
            int scale = 0;
            boolean fraction = false;
            for (; i < pos; i++) {
                char ch = text.charAt(i);
                if (ch == '.') {
                    fraction = true;
                    continue;
                }
                if (ch == 'e' || ch == 'E') {
                    break;
                }
                if (digits != 0 || ch != '0') {
                    if (++significant > 15) {
                        return Double.NaN;
                    }
                }
                digits = digits * 10 + (ch - '0');
                if (fraction) {
                    scale--;
                }
            }
            if (i < pos) {
                int e = i + 1;
                boolean negativeExponent = text.charAt(e) == '-';
                if (text.charAt(e) == '-' || text.charAt(e) == '+') {
                    e++;
                }
                if (pos - e > 3) {
                    return Double.NaN;
                }
                int exponent = Integer.parseInt(text, e, pos, 10);
                scale += negativeExponent ? -exponent : exponent;
            }
            if (scale < -22 || scale > 22) {
                return Double.NaN;
            }
            double d = scale < 0 ? digits / POWERS_OF_TEN[-scale] : digits * POWERS_OF_TEN[scale];
            return negative ? -d : d;
        }

        private boolean zeroMantissa(int start) {
            for (int i = start; i < pos; i++) {
                char ch = text.charAt(i);
                if (ch == 'e' || ch == 'E') {
                    return true;
                }
                if (ch >= '1' && ch <= '9') {
                    return false;
                }
            }
            return true;
        }
    }
}
