package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.onefold.OnefoldException;
import dev.onefold.avro.internal.JsonRowReader;
import dev.onefold.record.Row;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Random;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericRecord;

/**
 * The direct JSON lines reader and writer against the generic path they replace (the test oracle): for every
 * line, either both read the same row or both refuse it with the same message; every row is written to the same
 * characters. Lines come from generated schemas and records, from adversarial tokens placed in a fixed schema
 * that has every supported type, and from mutating good lines (truncated, garbage inserted, characters dropped,
 * keys duplicated).
 */
class JsonLinesDirectPathProperties {
    private static final String WHERE = "in.jsonl line 4";

    /** Reads {@code line} both ways and checks the outcomes agree; returns whether the direct reader took it. */
    static boolean assertSameOutcome(JsonLines lines, JsonRowReader direct, String line) {
        Row fast = direct.read(line);
        Row generic;
        try {
            generic = lines.parseGenericRow(line, WHERE);
        } catch (OnefoldException e) {
            assertNull(fast, () -> "the direct reader took a line the generic path refuses (" + e.getMessage() + "): " + line);
            OnefoldException viaLines = assertThrows(OnefoldException.class, () -> lines.parseRow(line, WHERE));
            assertEquals(e.getMessage(), viaLines.getMessage());
            assertEquals(OnefoldException.Kind.INVALID_RECORD, viaLines.kind());
            return false;
        }
        if (fast != null) {
            assertEquals(generic, fast, line);
            assertEquals(generic.toString(), fast.toString(), line); // tells -0.0 from 0.0 and NaN forms apart in lists
        }
        assertEquals(generic, lines.parseRow(line, WHERE), line);
        return fast != null;
    }

    @Property(tries = 200)
    void generatedRecords_writeAsTheGenericWriterAndReadBackDirectly(@ForAll long seed) {
        GeneratedSchemas gen = new GeneratedSchemas(seed);
        Schema schema = gen.keyedRecord();
        AvroRecordAccess access = AvroRecordAccess.of(schema);
        JsonLines lines = JsonLines.of(schema);
        JsonRowReader direct = JsonRowReader.of(schema, access.schema());
        Random random = new Random(seed);
        for (int i = 0; i < 4; i++) {
            GenericRecord g = gen.record(schema, random.nextLong(), i);
            Row row = access.toRow(g);
            String line = GenericJsonLines.write(row);
            assertEquals(line, lines.writeRow(row));
            assertEquals(line, lines.write(g));
            assertNotNull(direct.read(line), () -> "the direct reader declined a line the writer wrote: " + line);
            assertSameOutcome(lines, direct, line);
            assertSameOutcome(lines, direct, spaced(line, random));
            for (int m = 0; m < 6; m++) {
                assertSameOutcome(lines, direct, mutate(line, random));
            }
        }
    }

    /** Adds JSON whitespace (RFC 8259 section 2: space, tab, line feed, carriage return) after structural characters. */
    private static String spaced(String line, Random random) {
        StringBuilder sb = new StringBuilder();
        boolean inString = false;
        for (int i = 0; i < line.length(); i++) {
            char c = line.charAt(i);
            sb.append(c);
            if (c == '"' && (i == 0 || line.charAt(i - 1) != '\\')) {
                inString = !inString;
            }
            if (!inString && (c == '{' || c == '[' || c == ',' || c == ':') && random.nextBoolean()) {
                sb.append(" \t\n\r".charAt(random.nextInt(4)));
            }
        }
        return " " + sb + "\t";
    }

    private static final String[] JUNK = {"}", "]", ",", ":", "\"", "\\", "x", "{", "[", "0", "-", "e", "null", " ", "\u0001",
        "\"id\":1,", "\"zz\":1,", "1e400", ".", "\\u00"};

    /** One random damage: cut short, junk inserted, a character dropped, or a duplicated first key. */
    static String mutate(String line, Random random) {
        int at = line.isEmpty() ? 0 : random.nextInt(line.length() + 1);
        return switch (random.nextInt(5)) {
            case 0 -> line.substring(0, at);
            case 1 -> line.substring(0, at) + JUNK[random.nextInt(JUNK.length)] + line.substring(at);
            case 2 -> at < line.length() ? line.substring(0, at) + line.substring(at + 1) : line + "x";
            case 3 -> duplicateFirstKey(line);
            default -> line + JUNK[random.nextInt(JUNK.length)];
        };
    }

    private static String duplicateFirstKey(String line) {
        int comma = line.indexOf(",\"");
        return comma < 0 ? line + line : "{" + line.substring(1, comma + 1) + line.substring(1);
    }

    /** One schema with every supported type, defaults of each kind, and tagged-union candidates. */
    static final Schema FUZZ = TestSchemas.parse("""
            {"type": "record", "name": "Fuzz", "namespace": "t", "fields": [
              {"name": "i", "type": "int", "default": 7},
              {"name": "l", "type": "long", "default": -1},
              {"name": "f", "type": "float", "default": 1.5},
              {"name": "d", "type": "double", "default": 2.5},
              {"name": "b", "type": "boolean", "default": true},
              {"name": "s", "type": "string", "default": "x"},
              {"name": "ts", "type": {"type": "long", "logicalType": "timestamp-millis"}, "default": 0},
              {"name": "us", "type": ["null", {"type": "long", "logicalType": "timestamp-micros"}], "default": null},
              {"name": "day", "type": {"type": "int", "logicalType": "date"}, "default": 0},
              {"name": "id", "type": ["null", {"type": "string", "logicalType": "uuid"}]},
              {"name": "dec", "type": ["null", {"type": "bytes", "logicalType": "decimal", "precision": 6, "scale": 2}]},
              {"name": "bin", "type": ["null", "bytes"]},
              {"name": "fx", "type": ["null", {"type": "fixed", "name": "F4", "size": 4}]},
              {"name": "e", "type": ["null", {"type": "enum", "name": "E", "symbols": ["A", "B"]}]},
              {"name": "en", "type": {"type": "enum", "name": "E2", "symbols": ["X", "Y"]}, "default": "Y"},
              {"name": "n", "type": ["null", "double"]},
              {"name": "r", "type": ["null", {"type": "record", "name": "R", "fields": [
                {"name": "a", "type": "int"}, {"name": "R", "type": ["null", "string"]}]}]},
              {"name": "m", "type": ["null", {"type": "map", "values": "int"}]},
              {"name": "arr", "type": {"type": "array", "items": ["string", "null"]}, "default": []},
              {"name": "one", "type": ["long"], "default": 3},
              {"name": "req", "type": "string"}
            ]}""");

    /** Tokens that each field reads, or ought to refuse; "valid" ones must be taken by the direct reader. */
    private static final Map<String, List<String>> VALID = Map.ofEntries(
            Map.entry("i", List.of("0", "-0", "2147483647", "-2147483648", "00012")),
            Map.entry("l", List.of("9223372036854775807", "-9223372036854775808", "0000000000000000000000042", "-7")),
            // RFC 8259 section 6 examples of numbers: 1E400 "will not fit an IEEE 754 double" (it reads as Infinity
            // here, as the generic path does), 3.141592653589793238462643383279 more digits than a double holds
            Map.entry("f", List.of("1.5", "3.4028235e38", "1e-50", "\"NaN\"", "\"-Infinity\"", "\"-0.0\"", "-0.0", "1E400")),
            Map.entry("d", List.of("1e300", "-1e-400", "-0", "-0.0", "4.9e-324", "3.141592653589793238462643383279",
                    "\"Infinity\"", "1E400", "12345678901234567890123", "-0e5", "1E+2")),
            Map.entry("b", List.of("true", "false")),
            // RFC 8259 section 7: "\u005C" is a reverse solidus; the G clef U+1D11E is "\uD834\uDD1E"
            Map.entry("s", List.of("\"\"", "\"\\u005C\"", "\"\\uD834\\uDD1E\"", "\"\\ud800\"", "\"\\/\\b\\f\\n\\r\\t\\\"\"",
                    "\"\u00e9\u4e2d\ud83d\ude00\"", "\"a\u2028b\"")),
            Map.entry("ts", List.of("\"2024-02-29T13:00:00Z\"", "\"2024-02-29T13:00:00.123Z\"", "\"1969-12-31T23:59:59.999Z\"",
                    "\"0000-01-01T00:00:00Z\"", "\"+10000-01-01T00:00:00Z\"", "\"2016-12-31T23:59:60Z\"", "-1", "1709211600000",
                    "\"2024-02-29t13:00:00z\"", "\"2024-02-29T13:00:00.1Z\"")),
            Map.entry("us", List.of("null", "\"2024-02-29T13:00:00.123456Z\"", "\"1900-01-01T00:00:00.000001Z\"", "{\"long\": 5}",
                    "\"-290308-12-21T19:59:05.224192Z\"")),
            Map.entry("day", List.of("\"2024-02-29\"", "\"0001-01-01\"", "\"+12345-01-01\"", "-719162", "19782")),
            Map.entry("id", List.of("null", "\"123e4567-e89b-12d3-a456-426614174000\"", "\"123E4567-E89B-12D3-A456-426614174000\"",
                    "{\"string\": \"123e4567-e89b-12d3-a456-426614174000\"}")),
            Map.entry("dec", List.of("null", "1234.5", "\"-9999.99\"", "0", "-0.00", "12e1", "{\"bytes\": 1.25}")),
            Map.entry("bin", List.of("null", "\"\"", "\"AQIDBA==\"", "{\"bytes\": \"AA==\"}")),
            Map.entry("fx", List.of("null", "\"AQIDBA==\"", "{\"t.F4\": \"AQIDBA==\"}")),
            Map.entry("e", List.of("null", "\"A\"", "{\"t.E\": \"B\"}")),
            Map.entry("en", List.of("\"X\"", "\"Y\"")),
            Map.entry("n", List.of("null", "1", "{\"double\": 2.5}", "{ \"double\" : \"NaN\" }")),
            Map.entry("r", List.of("null", "{\"a\": 1}", "{\"R\": \"x\", \"a\": 2}", "{\"a\": 3, \"R\": null}")),
            Map.entry("m", List.of("null", "{}", "{\"b\": 1, \"a\": 2}", "{\"\": 0, \"map\": 1}")),
            Map.entry("arr", List.of("[]", "[null, \"x\", null]", "[\"\\u0000\"]")),
            Map.entry("one", List.of("5", "{\"long\": 6}")),
            Map.entry("req", List.of("\"r\"", "\"\\u0072\"")));

    /** Tokens every field refuses, or reads through the generic path only (tagged records and maps). */
    private static final List<String> HOSTILE = List.of("2147483648", "-2147483649", "9223372036854775808",
            "-9223372036854775809", "1.", ".5", "+1", "1e", "1e+", "-", "01.5e", "tru", "nul", "\"abc", "\"\\x\"", "\"\\u12\"",
            "\"\\u+123\"", "\"\\uzzzz\"", "\"a\tb\"", "\"\\u0000\"", "[1,]", "{\"a\": 1,}", "{\"t.R\": {\"a\": 9}}",
            "{\"map\": {\"a\": 1}}", "{\"map\": 1}", "{\"double\": 1, \"x\": 2}", "{\"long\": 1}", "{\"double\": null}",
            "{\"null\": null}", "{\"a\": 1, \"a\": 2}", "\"2024-02-30\"", "\"2024-13-01T00:00:00Z\"", "\"24:00\"",
            "\"2024-02-29T13:00:00.0001Z\"", "\"2024-02-29T13:00:00.123456789Z\"", "\"C\"", "\"AQI=\"", "\"not base64\"",
            "12345.678", "1e9999999999", "1e0000000001", "\"1e9999999999\"", "[[]]", "{}", "[]", "\"\"", "true", "null", "0");

    @Property(tries = 1000)
    void adversarialTokens_readTheSameBothWays(@ForAll long seed) {
        Random random = new Random(seed);
        AvroRecordAccess access = AvroRecordAccess.of(FUZZ);
        JsonLines lines = JsonLines.of(FUZZ);
        JsonRowReader direct = JsonRowReader.of(FUZZ, access.schema());
        List<String> names = new ArrayList<>(FUZZ.getFields().stream().map(Schema.Field::name).toList());
        Collections.shuffle(names, random);
        StringBuilder valid = new StringBuilder("{");
        StringBuilder hostile = new StringBuilder("{");
        for (String name : names) {
            boolean required = name.equals("req");
            if (!required && random.nextInt(5) == 0) {
                continue; // missing: takes its default, or null
            }
            List<String> options = VALID.get(name);
            String good = options.get(random.nextInt(options.size()));
            String bad = random.nextInt(3) == 0 ? HOSTILE.get(random.nextInt(HOSTILE.size())) : good;
            String sep = random.nextBoolean() ? "" : " ";
            valid.append(valid.length() > 1 ? "," + sep : "").append('"').append(name).append("\":").append(sep).append(good);
            hostile.append(hostile.length() > 1 ? "," : "").append('"').append(name).append("\":").append(bad);
        }
        String validLine = valid.append('}').toString();
        boolean taken = assertSameOutcome(lines, direct, validLine);
        if (!validLine.contains("{\"t.R\"") && !validLine.contains("{\"map\"") && !validLine.contains("\"+")
                && !validLine.contains("\"-290308") && !validLine.contains("23:59:60") && !validLine.contains("t13:")) {
            assertEquals(true, taken, () -> "the direct reader declined a valid line: " + validLine);
        }
        assertSameOutcome(lines, direct, hostile.append('}').toString());
        assertSameOutcome(lines, direct, mutate(validLine, random));
    }
}
