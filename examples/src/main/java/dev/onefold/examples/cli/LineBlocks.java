package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import java.io.IOException;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;

/**
 * A JSON lines file read as blocks of whole lines of raw bytes, so the reading thread only finds where lines
 * start and end, and the UTF-8 decoding and parsing of each line happen on the workers. Lines end as
 * {@code BufferedReader.readLine} ends them (line feed, carriage return, or both), are numbered from 1, and
 * blank lines (only whitespace, as {@link String#isBlank}) are skipped without taking a record index.
 *
 * <p>Invariant: a block never splits a line or a carriage return-line feed pair; a line longer than a block
 * grows the next read until it is whole. Single-threaded; must be closed. Cost: one pass over the bytes.
 */
final class LineBlocks implements AutoCloseable {
    /** Bytes read per block: a few thousand typical lines, so blocks spread over the workers from the start. */
    private static final int BLOCK = 1 << 18;

    private final String file;
    private final InputStream in;
    private final int blockSize;
    private byte[] pending = new byte[0];
    private int pendingLength;
    private long lineNo;
    private long index;
    private boolean ended;

    private LineBlocks(String file, InputStream in, int blockSize) {
        this.file = file;
        this.in = in;
        this.blockSize = blockSize;
    }

    /** @throws OnefoldException (IO) naming the file when it cannot be opened */
    static LineBlocks open(Path path) {
        return open(path, BLOCK);
    }

    /** As {@link #open(Path)}, reading {@code blockSize} bytes at a time (tests use small blocks to cut lines often). */
    static LineBlocks open(Path path, int blockSize) {
        try {
            return new LineBlocks(path.toString(), Files.newInputStream(path), blockSize);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, path + ": cannot open: " + e.getMessage(), e);
        }
    }

    /** The non-blank lines of one block of the file. */
    record Block(String file, byte[] bytes, int[] starts, int[] ends, long[] numbers, int count, long firstIndex) {
        /**
         * The text of the i-th line of the block.
         *
         * @throws OnefoldException (IO) naming the file and line when it is not valid UTF-8, which ends the run
         */
        String text(int i) {
            int start = starts[i];
            int length = ends[i] - start;
            String text = new String(bytes, start, length, StandardCharsets.UTF_8);
            // malformed bytes decode to U+FFFD: only then is the strict decoder needed to tell them from a real U+FFFD
            if (text.indexOf('\uFFFD') >= 0) {
                try {
                    StandardCharsets.UTF_8.newDecoder().decode(ByteBuffer.wrap(bytes, start, length));
                } catch (CharacterCodingException e) {
                    throw new OnefoldException(OnefoldException.Kind.IO, file + " line " + numbers[i]
                            + ": not valid UTF-8 text; a JSON lines file must be UTF-8", e);
                }
            }
            return text;
        }
    }

    /**
     * The next block of whole lines (possibly with none that is not blank), or null at the end of the file.
     *
     * @throws OnefoldException (IO) naming the file when it cannot be read
     */
    Block next() {
        if (ended) {
            return null;
        }
        byte[] buf = Arrays.copyOf(pending, Math.max(blockSize, pendingLength * 2));
        int n = pendingLength;
        boolean atEnd = false;
        try {
            while (n < buf.length) {
                int read = in.read(buf, n, buf.length - n);
                if (read < 0) {
                    atEnd = true;
                    break;
                }
                n += read;
            }
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, file + ": cannot read: " + e.getMessage(), e);
        }
        int cut = atEnd ? n : lastLineEnd(buf, n);
        pending = Arrays.copyOfRange(buf, cut, n);
        pendingLength = n - cut;
        ended = atEnd;
        return split(buf, cut, atEnd);
    }

    /** The position after the last line end in buf[0, n) that is surely whole (a final CR may precede an LF). */
    private static int lastLineEnd(byte[] buf, int n) {
        for (int i = n - 1; i >= 0; i--) {
            if (buf[i] == '\n' || buf[i] == '\r' && i < n - 1) {
                return i + 1;
            }
        }
        return 0;
    }

    private Block split(byte[] buf, int cut, boolean atEnd) {
        int capacity = Math.max(16, cut / 64);
        int[] starts = new int[capacity];
        int[] ends = new int[capacity];
        long[] numbers = new long[capacity];
        int count = 0;
        long firstIndex = index;
        int lineStart = 0;
        int i = 0;
        while (i < cut || atEnd && lineStart < cut) {
            if (i < cut && buf[i] != '\n' && buf[i] != '\r') {
                i++;
                continue;
            }
            lineNo++;
            if (!blank(buf, lineStart, i)) {
                if (count == starts.length) {
                    starts = Arrays.copyOf(starts, count * 2);
                    ends = Arrays.copyOf(ends, count * 2);
                    numbers = Arrays.copyOf(numbers, count * 2);
                }
                starts[count] = lineStart;
                ends[count] = i;
                numbers[count] = lineNo;
                count++;
            }
            if (i < cut && buf[i] == '\r' && i + 1 < cut && buf[i + 1] == '\n') {
                i++;
            }
            i++;
            lineStart = i;
        }
        index += count;
        return new Block(file, buf, starts, ends, numbers, count, firstIndex);
    }

    /** Whether buf[start, end) holds only whitespace (as String.isBlank after decoding). */
    private static boolean blank(byte[] buf, int start, int end) {
        for (int i = start; i < end; i++) {
            byte b = buf[i];
            if (b < 0) {
                return new String(buf, start, end - start, StandardCharsets.UTF_8).isBlank();
            }
            // ASCII whitespace by Character.isWhitespace: tab, LF, VT, FF, CR, the four separators 0x1C-0x1F, space
            if (b != ' ' && (b < 9 || b > 13) && (b < 0x1C || b > 0x1F)) {
                return false;
            }
        }
        return true;
    }

    @Override
    public void close() {
        try {
            in.close();
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, file + ": cannot close: " + e.getMessage(), e);
        }
    }
}
