package dev.onefold.avro.internal;

import dev.onefold.OnefoldException;
import java.io.EOFException;
import java.io.IOException;
import java.io.RandomAccessFile;
import java.nio.file.Path;
import java.util.Arrays;

/**
 * Checks the block structure of an Avro object container file before Avro's reader sees it, because that
 * reader stops silently at a truncated last block (records would be lost without an error) and allocates
 * whatever size a block header declares.
 *
 * <pre>
 *  "Obj" 01 | metadata: map of bytes (blocks of zig-zag count, entries) | sync marker (16 bytes)
 *  then per block: record count (zig-zag long) | byte size (zig-zag long) | data | the same sync marker
 * </pre>
 * The file must end exactly after a block's sync marker; every declared size must fit in the bytes that remain
 * and in {@code maxBlockBytes}. Cost: reads the header and 16 bytes per block, seeking over the data.
 * Stateless; thread-safe.
 */
public final class ContainerCheck {
    private static final byte[] MAGIC = {'O', 'b', 'j', 1};

    private ContainerCheck() {}

    /**
     * Checks one file.
     *
     * @throws OnefoldException (CORRUPT) naming the file, the block and what is wrong; (IO) when it cannot be read
     */
    public static void check(Path file, long maxBlockBytes) {
        try (RandomAccessFile in = new RandomAccessFile(file.toFile(), "r")) {
            long length = in.length();
            byte[] magic = new byte[4];
            in.readFully(magic);
            if (!Arrays.equals(magic, MAGIC)) {
                throw OnefoldException.corrupt("container file " + file + ": does not start with the magic bytes Obj 01");
            }
            for (long count = varint(in, file); count != 0; count = varint(in, file)) {
                if (count < 0) {
                    varint(in, file); // byte size of the block, not needed: entries are walked one by one
                    count = -count;
                }
                for (long i = 0; i < count; i++) {
                    skip(in, varint(in, file), length, file, "metadata");
                    skip(in, varint(in, file), length, file, "metadata");
                }
            }
            byte[] sync = new byte[16];
            in.readFully(sync);
            byte[] blockSync = new byte[16];
            for (long block = 0; in.getFilePointer() < length; block++) {
                long records = varint(in, file);
                long size = varint(in, file);
                if (records < 0 || size < 0 || size > maxBlockBytes) {
                    throw OnefoldException.corrupt("container file " + file + ": block " + block + " declares " + records
                            + " records in " + size + " bytes (limit " + maxBlockBytes + ")");
                }
                skip(in, size, length, file, "block " + block);
                in.readFully(blockSync);
                if (!Arrays.equals(sync, blockSync)) {
                    throw OnefoldException.corrupt("container file " + file + ": block " + block
                            + " is not followed by the file's sync marker");
                }
            }
        } catch (EOFException e) {
            throw OnefoldException.corrupt("container file " + file + ": ends in the middle of a block or header (truncated?)");
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "container file " + file + ": cannot read: " + e, e);
        }
    }

    private static void skip(RandomAccessFile in, long n, long length, Path file, String where) throws IOException {
        if (n < 0 || n > length - in.getFilePointer()) {
            throw OnefoldException.corrupt("container file " + file + ": " + where + " declares " + n + " bytes but "
                    + (length - in.getFilePointer()) + " remain (truncated?)");
        }
        in.seek(in.getFilePointer() + n);
    }

    private static long varint(RandomAccessFile in, Path file) throws IOException {
        long raw = 0;
        for (int shift = 0; shift < 70; shift += 7) {
            int b = in.readUnsignedByte();
            raw |= (long) (b & 0x7f) << shift;
            if ((b & 0x80) == 0) {
                return (raw >>> 1) ^ -(raw & 1);
            }
        }
        throw OnefoldException.corrupt("container file " + file + ": a number at byte " + in.getFilePointer()
                + " is longer than 10 bytes");
    }
}
