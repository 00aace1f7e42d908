package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import java.util.zip.CRC32C;

/**
 * A checksummed section, the framing every archive file is built from:
 *
 * <pre>
 *  +----------------+----------------+---------------------+
 *  | length  u32 BE | CRC-32C u32 BE | payload (length B)  |
 *  +----------------+----------------+---------------------+
 * </pre>
 * CRC-32C (Castagnoli, the iSCSI CRC of RFC 3720) covers the payload only. Stateless and thread-safe.
 */
public final class Sections {
    /** Bytes of framing before each payload. */
    public static final int FRAME = 8;

    private Sections() {}

    public static int crc32c(byte[] b, int off, int len) {
        CRC32C c = new CRC32C();
        c.update(b, off, len);
        return (int) c.getValue();
    }

    public static void write(ByteWriter out, byte[] payload, int len) {
        out.writeInt(len);
        out.writeInt(crc32c(payload, 0, len));
        out.write(payload, 0, len);
    }

    /**
     * Reads one section, checking its length against the bytes left and its checksum.
     *
     * @throws OnefoldException CORRUPT naming {@code file}, {@code what} and the offset
     */
    public static byte[] read(ByteReader in, String file, String what) {
        int at = in.position();
        if (in.remaining() < FRAME) {
            throw OnefoldException.corrupt(file + ": TRUNCATED: " + what + " at byte " + at + " is cut off");
        }
        int len = in.readInt();
        int crc = in.readInt();
        if (len < 0 || len > in.remaining()) {
            throw OnefoldException.corrupt(file + ": TRUNCATED: " + what + " at byte " + at + " claims " + (len & 0xFFFFFFFFL)
                    + " bytes but " + in.remaining() + " remain");
        }
        byte[] payload = in.read(len);
        int actual = crc32c(payload, 0, len);
        if (actual != crc) {
            throw OnefoldException.corrupt(String.format("%s: CHECKSUM_MISMATCH: %s at byte %d has CRC-32C %08x, expected %08x",
                    file, what, at, actual, crc));
        }
        return payload;
    }
}
