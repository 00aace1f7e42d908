package dev.onefold.internal.bytes;

import dev.onefold.OnefoldException;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;

/**
 * Reads what {@link ByteWriter} writes, checking bounds: reading past the end or a malformed varint throws
 * {@link OnefoldException} (CORRUPT) naming {@code source}, never an index exception. Not thread-safe.
 */
public final class ByteReader {
    private final byte[] buf;
    private final int end;
    private final String source;
    private int pos;

    public ByteReader(byte[] buf, String source) {
        this(buf, 0, buf.length, source);
    }

    public ByteReader(byte[] buf, int off, int len, String source) {
        this.buf = buf;
        this.pos = off;
        this.end = off + len;
        this.source = source;
    }

    public int position() {
        return pos;
    }

    public boolean hasMore() {
        return pos < end;
    }

    public int remaining() {
        return end - pos;
    }

    private void need(int n) {
        if (n < 0 || end - pos < n) {
            throw OnefoldException.corrupt(source + ": truncated at byte " + pos + " (needed " + n + " more, "
                    + (end - pos) + " left)");
        }
    }

    public int read() {
        need(1);
        return buf[pos++] & 0xFF;
    }

    public byte[] read(int n) {
        need(n);
        byte[] out = Arrays.copyOfRange(buf, pos, pos + n);
        pos += n;
        return out;
    }

    public int readInt() {
        need(4);
        int v = ((buf[pos] & 0xFF) << 24) | ((buf[pos + 1] & 0xFF) << 16) | ((buf[pos + 2] & 0xFF) << 8) | (buf[pos + 3] & 0xFF);
        pos += 4;
        return v;
    }

    public long readLong() {
        need(8);
        long v = 0;
        for (int i = 0; i < 8; i++) {
            v = (v << 8) | (buf[pos + i] & 0xFF);
        }
        pos += 8;
        return v;
    }

    public long readVarLong() {
        long v = 0;
        for (int shift = 0; shift < 70; shift += 7) {
            int b = read();
            v |= (long) (b & 0x7F) << shift;
            if ((b & 0x80) == 0) {
                return v;
            }
        }
        throw OnefoldException.corrupt(source + ": malformed varint at byte " + pos);
    }

    public int readVarInt() {
        long v = readVarLong();
        if (v < 0 || v > Integer.MAX_VALUE) {
            throw OnefoldException.corrupt(source + ": length " + v + " out of range at byte " + pos);
        }
        return (int) v;
    }

    public long readZigZag() {
        long v = readVarLong();
        return (v >>> 1) ^ -(v & 1);
    }

    public byte[] readBlob() {
        return read(readVarInt());
    }

    public String readString() {
        int n = readVarInt();
        need(n);
        String s = new String(buf, pos, n, StandardCharsets.UTF_8);
        pos += n;
        return s;
    }

    public String source() {
        return source;
    }
}
