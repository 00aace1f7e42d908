package dev.onefold.internal.json;

import dev.onefold.OnefoldException;
import java.math.BigDecimal;
import java.math.BigInteger;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A small, strict JSON reader and writer (RFC 8259) so that core needs no JSON library. Objects become
 * {@code LinkedHashMap<String, Object>} in document order, arrays {@code ArrayList}, numbers {@code Long} when
 * integral and in range, otherwise {@code BigDecimal}; strings, booleans and null as usual.
 *
 * <p>Stateless and thread-safe. Parsing is linear in the input; nesting deeper than 512 is refused so
 * hostile input cannot overflow the stack.
 */
public final class Json {
    private static final int MAX_DEPTH = 512;

    private final String text;
    private final String source;
    private int pos;
    private int depth;

    private Json(String text, String source) {
        this.text = text;
        this.source = source;
    }

    /**
     * Parses one JSON value that must fill the whole text.
     *
     * @param source names the text in error messages (a file name, "spec", ...)
     * @throws OnefoldException (INVALID_RECORD) naming the source, line and column
     */
    public static Object parse(String text, String source) {
        Json p = new Json(text, source);
        p.skipSpace();
        Object v = p.value();
        p.skipSpace();
        if (p.pos != text.length()) {
            throw p.error("unexpected text after the JSON value");
        }
        return v;
    }

    private Object value() {
        if (pos >= text.length()) {
            throw error("unexpected end of input");
        }
        char c = text.charAt(pos);
        switch (c) {
            case '{':
                return object();
            case '[':
                return array();
            case '"':
                return string();
            case 't':
                literal("true");
                return Boolean.TRUE;
            case 'f':
                literal("false");
                return Boolean.FALSE;
            case 'n':
                literal("null");
                return null;
            default:
                if (c == '-' || (c >= '0' && c <= '9')) {
                    return number();
                }
                throw error("unexpected character '" + c + "'");
        }
    }

    private Map<String, Object> object() {
        enter();
        pos++;
        Map<String, Object> out = new LinkedHashMap<>();
        skipSpace();
        if (peek() == '}') {
            pos++;
            depth--;
            return out;
        }
        while (true) {
            skipSpace();
            if (peek() != '"') {
                throw error("expected a string key");
            }
            String key = string();
            skipSpace();
            expect(':');
            skipSpace();
            if (out.containsKey(key)) {
                throw error("duplicate key \"" + key + "\"");
            }
            out.put(key, value());
            skipSpace();
            char c = next();
            if (c == '}') {
                depth--;
                return out;
            }
            if (c != ',') {
                pos--;
                throw error("expected ',' or '}'");
            }
        }
    }

    private List<Object> array() {
        enter();
        pos++;
        List<Object> out = new ArrayList<>();
        skipSpace();
        if (peek() == ']') {
            pos++;
            depth--;
            return out;
        }
        while (true) {
            skipSpace();
            out.add(value());
            skipSpace();
            char c = next();
            if (c == ']') {
                depth--;
                return out;
            }
            if (c != ',') {
                pos--;
                throw error("expected ',' or ']'");
            }
        }
    }

    private void enter() {
        if (++depth > MAX_DEPTH) {
            throw error("nesting deeper than " + MAX_DEPTH);
        }
    }

    private String string() {
        pos++;
        StringBuilder sb = null;
        int start = pos;
        while (true) {
            if (pos >= text.length()) {
                throw error("unterminated string");
            }
            char c = text.charAt(pos);
            if (c == '"') {
                String s = sb == null ? text.substring(start, pos) : sb.append(text, start, pos).toString();
                pos++;
                return s;
            }
            if (c < 0x20) {
                throw error("control character in string");
            }
            if (c == '\\') {
                if (sb == null) {
                    sb = new StringBuilder();
                }
                sb.append(text, start, pos);
                pos++;
                char e = next();
                if (e == 'u') {
                    if (pos + 4 > text.length()) {
                        throw error("truncated \\u escape");
                    }
                    try {
                        sb.append((char) Integer.parseInt(text.substring(pos, pos + 4), 16));
                    } catch (NumberFormatException ex) {
                        throw error("bad \\u escape");
                    }
                    pos += 4;
                } else {
                    int unescaped = unescape(e);
                    if (unescaped < 0) {
                        throw error("bad escape \\" + e);
                    }
                    sb.append((char) unescaped);
                }
                start = pos;
            } else {
                pos++;
            }
        }
    }

    /**
     * The character a one-letter string escape stands for (RFC 8259 section 7: {@code \" \\ \/ \b \f \n \r \t}),
     * or -1 when the letter is none of them (the letter u, for four hex digits, is read separately). Shared with
     * readers that scan strings themselves.
     */
    public static int unescape(char letter) {
        return switch (letter) {
            case '"' -> '"';
            case '\\' -> '\\';
            case '/' -> '/';
            case 'b' -> '\b';
            case 'f' -> '\f';
            case 'n' -> '\n';
            case 'r' -> '\r';
            case 't' -> '\t';
            default -> -1;
        };
    }

    private Object number() {
        int start = pos;
        int end = numberEnd(text, start);
        if (end < 0) {
            pos = -end - 1;
            throw error("expected a digit");
        }
        pos = end;
        boolean integral = true;
        for (int i = start; i < end && integral; i++) {
            integral = text.charAt(i) != '.' && text.charAt(i) != 'e' && text.charAt(i) != 'E';
        }
        String s = text.substring(start, pos);
        if (integral && pos - start <= 18) {
            // up to 18 characters (sign included) always fit a long: skip the BigInteger, the common case in JSON lines
            return Long.parseLong(s);
        }
        if (integral) {
            BigInteger bi = new BigInteger(s);
            if (bi.bitLength() < 64) {
                return bi.longValue();
            }
        }
        try {
            return new BigDecimal(s);
        } catch (NumberFormatException e) {
            // an exponent beyond BigDecimal's int scale, for example 1e9999999999
            throw error("number out of range");
        }
    }

    /**
     * Where the JSON number starting at {@code start} ends: {@code -?digits(.digits)?([eE][+-]?digits)?} with ASCII
     * digits (leading zeros are read too). When the text is no number, {@code -1 - p} where p is the position that
     * needed a digit. Shared with readers that scan numbers themselves, so they accept exactly what this reader
     * accepts.
     */
    public static int numberEnd(CharSequence text, int start) {
        int pos = start;
        int n = text.length();
        if (pos < n && text.charAt(pos) == '-') {
            pos++;
        }
        pos = digitsEnd(text, pos);
        if (pos >= 0 && pos < n && text.charAt(pos) == '.') {
            pos = digitsEnd(text, pos + 1);
        }
        if (pos >= 0 && pos < n && (text.charAt(pos) == 'e' || text.charAt(pos) == 'E')) {
            pos++;
            if (pos < n && (text.charAt(pos) == '+' || text.charAt(pos) == '-')) {
                pos++;
            }
            pos = digitsEnd(text, pos);
        }
        return pos;
    }

    /** The end of the run of at least one ASCII digit at {@code pos}, or {@code -1 - pos} when there is none. */
    private static int digitsEnd(CharSequence text, int pos) {
        int start = pos;
        while (pos < text.length() && text.charAt(pos) >= '0' && text.charAt(pos) <= '9') {
            pos++;
        }
        return pos == start ? -1 - pos : pos;
    }

    private void literal(String word) {
        if (!text.startsWith(word, pos)) {
            throw error("expected " + word);
        }
        pos += word.length();
    }

    private void expect(char c) {
        if (next() != c) {
            pos--;
            throw error("expected '" + c + "'");
        }
    }

    private char peek() {
        if (pos >= text.length()) {
            throw error("unexpected end of input");
        }
        return text.charAt(pos);
    }

    private char next() {
        char c = peek();
        pos++;
        return c;
    }

    private void skipSpace() {
        while (pos < text.length()) {
            char c = text.charAt(pos);
            if (c == ' ' || c == '\t' || c == '\n' || c == '\r') {
                pos++;
            } else {
                return;
            }
        }
    }

    private OnefoldException error(String what) {
        int line = 1;
        int col = 1;
        for (int i = 0; i < Math.min(pos, text.length()); i++) {
            if (text.charAt(i) == '\n') {
                line++;
                col = 1;
            } else {
                col++;
            }
        }
        return OnefoldException.record(source + ": invalid JSON at line " + line + ", column " + col + ": " + what);
    }

    /** Writes a value built of maps, lists, strings, numbers, booleans and null as compact JSON. */
    public static String write(Object value) {
        StringBuilder sb = new StringBuilder();
        write(value, sb);
        return sb.toString();
    }

    public static void write(Object value, StringBuilder sb) {
        if (value == null) {
            sb.append("null");
        } else if (value instanceof String s) {
            quote(s, sb);
        } else if (value instanceof Boolean || value instanceof Long || value instanceof Integer
                || value instanceof Short || value instanceof Byte || value instanceof BigInteger) {
            sb.append(value);
        } else if (value instanceof BigDecimal d) {
            sb.append(d.toString());
        } else if (value instanceof Double || value instanceof Float) {
            double d = ((Number) value).doubleValue();
            if (Double.isNaN(d) || Double.isInfinite(d)) {
                quote(String.valueOf(d), sb);
            } else {
                sb.append(value);
            }
        } else if (value instanceof Map<?, ?> m) {
            sb.append('{');
            boolean first = true;
            for (Map.Entry<?, ?> e : m.entrySet()) {
                if (!first) {
                    sb.append(',');
                }
                first = false;
                quote(String.valueOf(e.getKey()), sb);
                sb.append(':');
                write(e.getValue(), sb);
            }
            sb.append('}');
        } else if (value instanceof Iterable<?> it) {
            sb.append('[');
            boolean first = true;
            for (Object o : it) {
                if (!first) {
                    sb.append(',');
                }
                first = false;
                write(o, sb);
            }
            sb.append(']');
        } else {
            quote(value.toString(), sb);
        }
    }

    public static void quote(String s, StringBuilder sb) {
        sb.append('"');
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            switch (c) {
                case '"' -> sb.append("\\\"");
                case '\\' -> sb.append("\\\\");
                case '\n' -> sb.append("\\n");
                case '\r' -> sb.append("\\r");
                case '\t' -> sb.append("\\t");
                default -> {
                    if (c < 0x20) {
                        sb.append(String.format("\\u%04x", (int) c));
                    } else {
                        sb.append(c);
                    }
                }
            }
        }
        sb.append('"');
    }
}
