package dev.onefold.internal.bytes;

import java.nio.charset.StandardCharsets;
import java.util.Arrays;

/**
 * A growable byte buffer with the primitive writes onefold's encodings need: fixed big-endian integers,
 * unsigned LEB128 varints and zig-zag varints. Not thread-safe; reuse with {@link #reset()}.
 */
public final class ByteWriter {
    private byte[] buf;
    private int len;

    public ByteWriter() {
        this(64);
    }

    public ByteWriter(int capacity) {
        buf = new byte[Math.max(16, capacity)];
    }

    private void ensure(int extra) {
        if (len + extra > buf.length) {
            long want = Math.max((long) buf.length * 2, (long) len + extra);
            if (want > Integer.MAX_VALUE - 16) {
                throw new IllegalStateException("a single encoded value may not exceed 2 GiB");
            }
            buf = Arrays.copyOf(buf, (int) want);
        }
    }

    /**
     * Makes room for {@code extra} more bytes and returns the array to write them into, from index
     * {@link #length()}; {@link #advance} then counts what was written.
     */
    public byte[] reserve(int extra) {
        ensure(extra);
        return buf;
    }

    /** Counts {@code n} bytes written directly into the array {@link #reserve} returned. */
    public void advance(int n) {
        if (n < 0 || len + n > buf.length) {
            throw new IllegalArgumentException("cannot advance " + n + " bytes from " + len + " in " + buf.length);
        }
        len += n;
    }

    public ByteWriter reset() {
        len = 0;
        return this;
    }

    public int length() {
        return len;
    }

    /** How many bytes fit before the buffer must grow. */
    public int capacity() {
        return buf.length;
    }

    public ByteWriter write(int b) {
        ensure(1);
        buf[len++] = (byte) b;
        return this;
    }

    public ByteWriter write(byte[] bytes) {
        return write(bytes, 0, bytes.length);
    }

    public ByteWriter write(byte[] bytes, int off, int n) {
        ensure(n);
        System.arraycopy(bytes, off, buf, len, n);
        len += n;
        return this;
    }

    public ByteWriter writeInt(int v) {
        ensure(4);
        buf[len++] = (byte) (v >>> 24);
        buf[len++] = (byte) (v >>> 16);
        buf[len++] = (byte) (v >>> 8);
        buf[len++] = (byte) v;
        return this;
    }

    public ByteWriter writeLong(long v) {
        ensure(8);
        for (int shift = 56; shift >= 0; shift -= 8) {
            buf[len++] = (byte) (v >>> shift);
        }
        return this;
    }

    /** Unsigned LEB128. */
    public ByteWriter writeVarLong(long v) {
        ensure(10);
        while ((v & ~0x7FL) != 0) {
            buf[len++] = (byte) ((v & 0x7F) | 0x80);
            v >>>= 7;
        }
        buf[len++] = (byte) v;
        return this;
    }

    public ByteWriter writeVarInt(int v) {
        return writeVarLong(v & 0xFFFFFFFFL);
    }

    /** Zig-zag then LEB128, so small negative numbers stay short. */
    public ByteWriter writeZigZag(long v) {
        return writeVarLong((v << 1) ^ (v >> 63));
    }

    /** A varint length followed by the bytes. */
    public ByteWriter writeBlob(byte[] bytes) {
        writeVarInt(bytes.length);
        return write(bytes);
    }

    /**
     * A varint length followed by the UTF-8 bytes. ASCII text, the common case, is copied char by char without
     * the intermediate array {@code getBytes} would make; the bytes are the same.
     */
    public ByteWriter writeString(String s) {
        int n = s.length();
        for (int i = 0; i < n; i++) {
            if (s.charAt(i) >= 0x80) {
                return writeBlob(s.getBytes(StandardCharsets.UTF_8));
            }
        }
        writeVarInt(n);
        ensure(n);
        for (int i = 0; i < n; i++) {
            buf[len++] = (byte) s.charAt(i);
        }
        return this;
    }

    public byte[] toByteArray() {
        return Arrays.copyOf(buf, len);
    }

    /** The internal array; only the first {@link #length()} bytes are meaningful. */
    public byte[] array() {
        return buf;
    }
}
