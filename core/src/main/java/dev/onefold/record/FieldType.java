package dev.onefold.record;

import java.util.Objects;

/**
 * The type of one field of a {@link RowSchema}: a primitive, a logical type, or a list, map or nested record,
 * each nullable or not.
 *
 * <p>Java values by kind: BOOLEAN {@code Boolean}; INT and DATE (days since 1970-01-01) {@code Integer}; LONG,
 * TIMESTAMP_MILLIS and TIMESTAMP_MICROS (since 1970-01-01T00:00Z) {@code Long}; FLOAT {@code Float}; DOUBLE
 * {@code Double}; STRING {@code String}; BYTES a read-only {@code java.nio.ByteBuffer}; UUID
 * {@code java.util.UUID}; DECIMAL {@code java.math.BigDecimal} at the declared scale; LIST an unmodifiable
 * {@code List}; MAP an unmodifiable {@code Map<String, ?>} sorted by key; RECORD a {@link Row}.
 *
 * <p>Immutable and thread-safe.
 */
public final class FieldType {

    /** The shape of a value. */
    public enum Kind {
        BOOLEAN, INT, LONG, FLOAT, DOUBLE, STRING, BYTES,
        TIMESTAMP_MILLIS, TIMESTAMP_MICROS, DATE, UUID, DECIMAL,
        LIST, MAP, RECORD;

        /** Whether values of this kind have a total order usable for keys, versions and sort order. */
        public boolean isOrderable() {
            return this != LIST && this != MAP && this != RECORD;
        }

        /** Whether values of this kind are whole numbers held in a Java int or long. */
        public boolean isIntegral() {
            return this == INT || this == LONG || this == DATE || this == TIMESTAMP_MILLIS || this == TIMESTAMP_MICROS;
        }

        /** The lower-case name used in schema JSON, for example {@code timestamp-millis}. */
        public String jsonName() {
            return name().toLowerCase(java.util.Locale.ROOT).replace('_', '-');
        }
    }

    private final Kind kind;
    private final boolean nullable;
    private final FieldType element;
    private final RowSchema record;
    private final int precision;
    private final int scale;

    private FieldType(Kind kind, boolean nullable, FieldType element, RowSchema record, int precision, int scale) {
        this.kind = kind;
        this.nullable = nullable;
        this.element = element;
        this.record = record;
        this.precision = precision;
        this.scale = scale;
    }

    public static FieldType of(Kind kind) {
        if (kind == Kind.LIST || kind == Kind.MAP || kind == Kind.RECORD || kind == Kind.DECIMAL) {
            throw new IllegalArgumentException(kind + " needs parameters: use list(), map(), record() or decimal()");
        }
        return new FieldType(kind, false, null, null, 0, 0);
    }

    public static FieldType bool() { return of(Kind.BOOLEAN); }
    public static FieldType int32() { return of(Kind.INT); }
    public static FieldType int64() { return of(Kind.LONG); }
    public static FieldType float32() { return of(Kind.FLOAT); }
    public static FieldType float64() { return of(Kind.DOUBLE); }
    public static FieldType string() { return of(Kind.STRING); }
    public static FieldType bytes() { return of(Kind.BYTES); }
    public static FieldType timestampMillis() { return of(Kind.TIMESTAMP_MILLIS); }
    public static FieldType timestampMicros() { return of(Kind.TIMESTAMP_MICROS); }
    public static FieldType date() { return of(Kind.DATE); }
    public static FieldType uuid() { return of(Kind.UUID); }

    public static FieldType decimal(int precision, int scale) {
        if (precision < 1 || scale < 0 || scale > precision) {
            throw new IllegalArgumentException("decimal needs 1 <= precision and 0 <= scale <= precision, got ("
                    + precision + ", " + scale + ")");
        }
        return new FieldType(Kind.DECIMAL, false, null, null, precision, scale);
    }

    public static FieldType list(FieldType element) {
        return new FieldType(Kind.LIST, false, Objects.requireNonNull(element, "element"), null, 0, 0);
    }

    /** A map from string keys to values of the given type. */
    public static FieldType map(FieldType values) {
        return new FieldType(Kind.MAP, false, Objects.requireNonNull(values, "values"), null, 0, 0);
    }

    public static FieldType record(RowSchema schema) {
        return new FieldType(Kind.RECORD, false, null, Objects.requireNonNull(schema, "schema"), 0, 0);
    }

    /** The same type, accepting null. */
    public FieldType nullable() {
        return nullable ? this : new FieldType(kind, true, element, record, precision, scale);
    }

    /** The same type, refusing null. */
    public FieldType required() {
        return nullable ? new FieldType(kind, false, element, record, precision, scale) : this;
    }

    public Kind kind() { return kind; }
    public boolean isNullable() { return nullable; }

    /** Element type of a LIST or value type of a MAP; null otherwise. */
    public FieldType element() { return element; }

    /** Schema of a RECORD; null otherwise. */
    public RowSchema recordSchema() { return record; }

    public int precision() { return precision; }
    public int scale() { return scale; }

    @Override
    public boolean equals(Object o) {
        return o instanceof FieldType t && t.kind == kind && t.nullable == nullable && Objects.equals(t.element, element)
                && Objects.equals(t.record, record) && t.precision == precision && t.scale == scale;
    }

    @Override
    public int hashCode() {
        return Objects.hash(kind, nullable, element, record, precision, scale);
    }

    @Override
    public String toString() {
        String base = switch (kind) {
            case LIST -> "list<" + element + ">";
            case MAP -> "map<" + element + ">";
            case RECORD -> "record " + record.name();
            case DECIMAL -> "decimal(" + precision + "," + scale + ")";
            default -> kind.jsonName();
        };
        return nullable ? base + "?" : base;
    }
}
