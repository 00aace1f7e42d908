package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.onefold.OnefoldException;
import dev.onefold.avro.internal.JsonRowReader;
import dev.onefold.record.Row;
import java.util.List;
import org.apache.avro.Schema;
import org.junit.jupiter.api.Test;

/** Worked examples for the direct JSON lines reader: published JSON texts, and bad lines with their exact reasons. */
class JsonLinesDirectPathTest {
    /** The object of RFC 8259 section 13 (first example), as an Avro schema. */
    private static final Schema IMAGE = TestSchemas.parse("""
            {"type": "record", "name": "Doc", "namespace": "rfc", "fields": [
              {"name": "Image", "type": {"type": "record", "name": "Image", "fields": [
                {"name": "Width", "type": "int"}, {"name": "Height", "type": "int"}, {"name": "Title", "type": "string"},
                {"name": "Thumbnail", "type": {"type": "record", "name": "Thumbnail", "fields": [
                  {"name": "Url", "type": "string"}, {"name": "Height", "type": "int"}, {"name": "Width", "type": "int"}]}},
                {"name": "Animated", "type": "boolean"}, {"name": "IDs", "type": {"type": "array", "items": "long"}}]}}]}""");

    /** Source: RFC 8259 section 13, the first example, verbatim (its line breaks and indentation included). */
    private static final String RFC_8259_IMAGE = """
            {
                  "Image": {
                      "Width":  800,
                      "Height": 600,
                      "Title":  "View from 15th Floor",
                      "Thumbnail": {
                          "Url":    "http://www.example.com/image/481989943",
                          "Height": 125,
                          "Width":  100
                      },
                      "Animated" : false,
                      "IDs": [116, 943, 234, 38793]
                    }
                }""";

    @Test
    void read_rfc8259ImageExample_readsDirectlyEveryValue() {
        JsonLines lines = JsonLines.of(IMAGE);
        Row direct = JsonRowReader.of(IMAGE, lines.rowSchema()).read(RFC_8259_IMAGE);
        assertNotNull(direct, "the direct reader takes the published example");
        assertEquals(lines.parseGenericRow(RFC_8259_IMAGE, "rfc"), direct);
        Row image = (Row) direct.get("Image");
        assertEquals(800, image.get("Width"));
        assertEquals("View from 15th Floor", image.get("Title"));
        assertEquals("http://www.example.com/image/481989943", ((Row) image.get("Thumbnail")).get("Url"));
        assertEquals(false, image.get("Animated"));
        assertEquals(List.of(116L, 943L, 234L, 38793L), image.get("IDs"));
    }

    private static final Schema SMALL = TestSchemas.parse("""
            {"type": "record", "name": "Small", "namespace": "t", "fields": [
              {"name": "n", "type": "int"}, {"name": "s", "type": ["null", "string"]},
              {"name": "m", "type": {"type": "map", "values": "long"}, "default": {}}]}""");

    @Test
    void parseRow_stringEscapes_followRfc8259() {
        JsonLines lines = JsonLines.of(SMALL);
        // Source: RFC 8259 section 7: "\u005C" is a reverse solidus, and the G clef (U+1D11E) is "\uD834\uDD1E"
        assertEquals("\\", lines.parseRow("{\"n\": 1, \"s\": \"\\u005C\"}", "l").get("s"));
        assertEquals(new String(Character.toChars(0x1D11E)), lines.parseRow("{\"n\": 1, \"s\": \"\\uD834\\uDD1E\"}", "l").get("s"));
        assertEquals("{\"n\":1,\"s\":\"\\\\ \\\" \\n \\u0001\",\"m\":{}}",
                lines.writeRow(lines.parseRow("{\"n\": 1, \"s\": \"\\\\ \\\" \\n \\u0001\"}", "l")));
    }

    @Test
    void parseRow_badLines_areRefusedWithTheGenericPathsReason() {
        assertRefused("{\"n\": 1, \"s\": \"a\"", "invalid JSON at line 1, column 18: unexpected end of input");
        assertRefused("{\"n\": 1} x", "invalid JSON at line 1, column 10: unexpected text after the JSON value");
        assertRefused("{\"n\": \"1\"}", "field 'n': expects an integer within the range of int, got \"1\"");
        assertRefused("{\"n\": 2147483648}", "field 'n': expects an integer within the range of int, got 2147483648");
        assertRefused("{\"n\": 1.0}", "field 'n': expects an integer within the range of int, got 1.0");
        // duplicate keys: RFC 8259 section 4 says names SHOULD be unique; the reader refuses duplicates
        assertRefused("{\"n\": 1, \"n\": 2}", "invalid JSON at line 1, column 15: duplicate key \"n\"");
        assertRefused("{\"n\": 1, \"m\": {\"a\": 1, \"a\": 1}}", "invalid JSON at line 1, column 29: duplicate key \"a\"");
        // RFC 8259 section 7 lists the only escapes; \x is none of them
        assertRefused("{\"n\": 1, \"s\": \"\\x\"}", "invalid JSON at line 1, column 18: bad escape \\x");
        assertRefused("{\"n\": 1, \"s\": \"\\u12\"}", "invalid JSON at line 1, column 18: bad \\u escape");
        assertRefused("{\"n\": 1, \"q\": 1}", "record: record t.Small has no field 'q' (it has [n, s, m])");
        assertRefused("{\"s\": null}", "field 'n': is missing and has no default");
        assertRefused("{\"n\": 1, \"m\": {\"a\": 1e9999999999}}", "invalid JSON at line 1, column 33: number out of range");
        assertRefused("[1]", "a line must hold one JSON object");
    }

    private static void assertRefused(String line, String reason) {
        JsonLines lines = JsonLines.of(SMALL);
        OnefoldException e = assertThrows(OnefoldException.class, () -> lines.parseRow(line, "in.jsonl line 3"));
        assertEquals(OnefoldException.Kind.INVALID_RECORD, e.kind());
        assertEquals("in.jsonl line 3: " + reason, e.getMessage());
        assertEquals(e.getMessage(), assertThrows(OnefoldException.class, () -> lines.parse(line, "in.jsonl line 3")).getMessage());
    }
}
